/**
 * Timing and heap helpers for the benchmark: each run is timed on its own
 * with performance.now(), and medians are reported (robust to the odd GC
 * pause or a busy neighbour process).
 */
import { performance } from 'node:perf_hooks';
import { setFlagsFromString } from 'node:v8';
import { runInNewContext } from 'node:vm';

/** Holds the last result of every timed call so the optimiser cannot drop the work. */
export let sink: unknown = null;

export function quantile(values: readonly number[], q: number): number {
  if (values.length === 0) return Number.NaN;
  const sorted = [...values].sort((a, b) => a - b);
  const position = (sorted.length - 1) * q;
  const below = Math.floor(position);
  const above = Math.ceil(position);
  return sorted[below]! + (sorted[above]! - sorted[below]!) * (position - below);
}

export function median(values: readonly number[]): number {
  return quantile(values, 0.5);
}

/** Milliseconds of each of `reps` calls, after `warmUp` untimed calls (for the JIT). */
export function timeEach(run: () => unknown, reps: number, warmUp: number): number[] {
  for (let i = 0; i < warmUp; i++) sink = run();
  const times: number[] = [];
  for (let i = 0; i < reps; i++) {
    const start = performance.now();
    sink = run();
    times.push(performance.now() - start);
  }
  return times;
}

/** One timed call, keeping its result. */
export function timeOnce<T>(run: () => T): { ms: number; result: T } {
  const start = performance.now();
  const result = run();
  const ms = performance.now() - start;
  sink = result;
  return { ms, result };
}

// `npm run bench` runs plain node (or tsx), without --expose-gc; turn it on here so
// heap figures can be read after a full collection rather than mid-garbage.
setFlagsFromString('--expose-gc');
const gc = runInNewContext('gc') as () => void;

/** Run a full garbage collection, twice, so weak and finalised objects go too. */
export function collectGarbage(): void {
  gc();
  gc();
}

export function heapUsedMb(): number {
  return process.memoryUsage().heapUsed / 1048576;
}
