/** One worker thread of a batch fit (fit-batch-threads.ts): fits its meters in turn and posts each line back. */
import { parentPort, workerData } from 'node:worker_threads';
import { fitMeter } from './fit-batch-meter.js';
import type { ThreadAnswer, ThreadWork } from './fit-batch-threads.js';

const work = workerData as ThreadWork;
const weather = new Map(work.weather);
for (const { index, meter } of work.items) {
  const stationDays = weather.get(meter.station) ?? weather.get(null);
  // The main thread checked that every meter has its weather before starting the threads.
  if (!stationDays) throw new Error(`meter ${meter.meter}: no weather`);
  const answer: ThreadAnswer = { index, result: fitMeter(meter, stationDays, work.options) };
  parentPort!.postMessage(answer);
}
