/**
 * A batch's meters fitted on several threads: the main thread and
 * `threads − 1` worker threads take the next unfitted meter from one shared
 * counter (so a slow meter holds up no one), and the lines are written in
 * the file's order as soon as every earlier one is in (so the output is the
 * same bytes as on one thread). The main thread fits too: a thread of its
 * own would only wait, and each extra thread compiles the engine again. A
 * failure that is not a meter's own (a bug) stops the batch, as it does on
 * one thread.
 */
import { Worker } from 'node:worker_threads';
import type { MeterTable } from '../input/batch-files.js';
import type { FitOptions } from '../options.js';
import type { WeatherFile } from '../input/weather-file.js';
import { fitMeter, withDayIndex, type MeterResult } from './fit-batch-meter.js';

/** What a worker thread is given: every meter, every station's weather, the options and the shared counter. */
export interface ThreadWork {
  meters: readonly MeterTable[];
  weather: [string | null, WeatherFile][];
  options: FitOptions;
  /** One Int32: the index of the next meter to take (Atomics.add). */
  next: SharedArrayBuffer;
}

/** A thread's answer for one meter. */
export interface ThreadAnswer {
  index: number;
  result: MeterResult;
}

/**
 * A thread's fitter: each call takes meters from the shared counter and
 * answers each, until none is left (false) or `stopAfter` were taken (true).
 * The stations' weather is indexed once, when the fitter is made.
 */
export function counterFitter(work: ThreadWork): (answer: (a: ThreadAnswer) => void, stopAfter?: number) => boolean {
  const counter = new Int32Array(work.next);
  const weather = new Map(work.weather.map(([station, file]) => [station, withDayIndex(file)]));
  return (answer, stopAfter = Infinity) => {
    for (let taken = 0; taken < stopAfter; taken++) {
      const index = Atomics.add(counter, 0, 1);
      if (index >= work.meters.length) return false;
      const meter = work.meters[index]!;
      const stationDays = weather.get(meter.station) ?? weather.get(null);
      // The main thread checked that every meter has its weather before starting the threads.
      if (!stationDays) throw new Error(`meter ${meter.meter}: no weather`);
      answer({ index, result: fitMeter(meter, stationDays, work.options) });
    }
    return true;
  };
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
  const work: ThreadWork = { meters, weather: [...weather], options, next: new SharedArrayBuffer(4) };
  const workers = Array.from({ length: threads - 1 }, () => startThread(work));
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
  // A worker's failure is seen between the main thread's meters, and stops the batch.
  let failed: unknown = null;
  const watched = Promise.all(finished).catch((error: unknown) => {
    failed = error;
  });
  try {
    // The main thread fits a few meters at a time, then lets the workers' answers in.
    const fitSome = counterFitter(work);
    while (failed === null && fitSome(receive, MAIN_THREAD_RUN))
      await new Promise<void>((resolve) => setImmediate(resolve));
    await watched;
    if (failed !== null) throw failed;
  } catch (error) {
    // Stop the others rather than fit meters whose lines will never be written.
    await Promise.all(workers.map((worker) => worker.terminate()));
    throw error;
  }
}

/** Meters the main thread fits before it takes in the workers' answers. */
const MAIN_THREAD_RUN = 4;
