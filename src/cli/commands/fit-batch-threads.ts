/**
 * A batch's meters fitted on worker threads: meter k goes to thread k mod n,
 * each thread answers its meters in turn, and the lines are written in the
 * file's order as soon as every earlier one is in (so the output is the same
 * bytes as on one thread). A failure that is not a meter's own (a bug)
 * stops the batch, as it does on one thread.
 */
import { Worker } from 'node:worker_threads';
import type { MeterTable } from '../input/batch-files.js';
import type { FitOptions } from '../options.js';
import type { WeatherFile } from '../input/weather-file.js';
import type { MeterResult } from './fit-batch-meter.js';

/** What one thread is given: its meters (with their place in the file), every station's weather, the options. */
export interface ThreadWork {
  items: { index: number; meter: MeterTable }[];
  weather: [string | null, WeatherFile][];
  options: FitOptions;
}

/** A thread's answer for one meter. */
export interface ThreadAnswer {
  index: number;
  result: MeterResult;
}

/**
 * A thread running the module beside this one: the compiled JavaScript, or
 * under the tests the TypeScript source, loaded through tsx's loader, which
 * the thread registers first.
 */
function startThread(workerData: ThreadWork): Worker {
  if (!import.meta.url.endsWith('.ts'))
    return new Worker(new URL('./fit-batch-thread.js', import.meta.url), { workerData });
  const source = new URL('./fit-batch-thread.ts', import.meta.url).href;
  const start = `import('tsx/esm/api').then((tsx) => { tsx.register(); return import(${JSON.stringify(source)}); })`;
  return new Worker(start, { eval: true, workerData });
}

export async function fitInWorkers(
  meters: readonly MeterTable[],
  weather: ReadonlyMap<string | null, WeatherFile>,
  options: FitOptions,
  threads: number,
  write: (result: MeterResult) => void,
): Promise<void> {
  const waiting = new Map<number, MeterResult>();
  let next = 0;
  const receive = ({ index, result }: ThreadAnswer) => {
    waiting.set(index, result);
    for (let ready = waiting.get(next); ready !== undefined; ready = waiting.get(next)) {
      waiting.delete(next);
      write(ready);
      next++;
    }
  };
  const workers = Array.from({ length: threads }, (_, t) => {
    const work: ThreadWork = {
      items: meters.flatMap((meter, index) => (index % threads === t ? [{ index, meter }] : [])),
      weather: [...weather],
      options,
    };
    return startThread(work);
  });
  const finished = workers.map(
    (worker) =>
      new Promise<void>((resolve, reject) => {
        worker.on('message', receive);
        worker.on('error', reject);
        worker.on('exit', (code) =>
          code === 0 ? resolve() : reject(new Error(`a fitting thread stopped with exit code ${code}`)),
        );
      }),
  );
  try {
    await Promise.all(finished);
  } catch (error) {
    // One thread failed: stop the others rather than fit meters whose lines will never be written.
    await Promise.all(workers.map((worker) => worker.terminate()));
    throw error;
  }
}
