/** One worker thread of a batch fit (fit-batch-threads.ts): takes meters from the shared counter and posts each line back. */
import { parentPort, workerData } from 'node:worker_threads';
import { counterFitter, type ThreadWork } from './fit-batch-threads.js';

counterFitter(workerData as ThreadWork)((answer) => parentPort!.postMessage(answer));
