/**
 * SSE profiles: the SSE of a shape as one changepoint moves, with the other
 * columns refitted at every position. A test of a searched changepoint reads
 * its statistic along this path (stats/davies-bound.ts). The same sweep
 * serves the mean form: each period becomes one pseudo-day at its mean
 * temperature, where the day-resolved terms are the ordinary hinges.
 */
import type { Period } from '../../types.js';
import { billDaysOf, type BillDays } from './bill-days.js';
import { sweepHinge, type Side } from './hinge-sweep.js';

/** Points of a profile in increasing changepoint order (centred units), and how many separate stretches they fall into. */
export interface SseProfile {
  tau: number[];
  sse: number[];
  pieces: number;
}

/** The SSE at every point a sweep of one hinge visits on the intervals in `mask`. */
export function hingeProfile(days: BillDays, side: Side, extra: Float64Array | null, mask: Uint8Array): SseProfile {
  const profile: SseProfile = { tau: [], sse: [], pieces: 0 };
  sweepHinge(days, side, extra, mask, (tau, sse) => {
    profile.tau.push(tau);
    profile.sse.push(sse);
  });
  for (let j = 0; j < mask.length; j++) if (mask[j] === 1 && (j === 0 || mask[j - 1] !== 1)) profile.pieces++;
  return profile;
}

/**
 * The search's view of periods in the form they are fitted in: their days
 * for the day-resolved form, one pseudo-day at the mean temperature each for
 * the mean form.
 */
export function billDaysForForm(periods: readonly Period[], form: 'daily' | 'mean'): BillDays {
  if (form === 'daily') return billDaysOf(periods);
  return billDaysOf(periods.map((period) => ({ ...period, dayTemps: [period.meanTemp] })));
}
