/**
 * Exact least-squares changepoints of the day-resolved (variable-base
 * degree-day) form for readings that span several days.
 *
 * Between two adjacent breakpoints (see bill-days.ts) a reading's heating
 * term mean(τ − T_d)₊ equals τ·s − S, with s the share of its days below the
 * interval and S their summed temperatures over its days; its cooling term is
 * Q − τ·r likewise. Every column is affine in τ there, so:
 *
 * - one changepoint (3PC, 3PH, 4P): on each interval the SSE is
 *   SST − (a + bτ)²/(A + 2Bτ + Cτ²) and its exact minimum is at an end or at
 *   the one stationary point (gram.ts); a sweep over the breakpoints keeps
 *   the inner products current in O(1) per day (hinge-sweep.ts), so the whole
 *   search is O(D log D) for D days of weather;
 * - two changepoints (5P): exact over pairs of intervals with a bound that
 *   prunes (five-point.ts).
 *
 * The 4P uses one changepoint for both hinges; since heating − cooling =
 * τ − mean temperature, it is the heating hinge beside the columns {1, mean}.
 *
 * Segment weights: a reading counts in each segment by the share of its days
 * that fall in it (a day on a changepoint counts in both segments), and a
 * changepoint may only sit where every segment keeps at least `minPoints`
 * readings' worth of days. For one-day readings this is the mean form's rule
 * (a period counted in the segment that holds its temperature); for bills it
 * credits a shoulder-season bill to both the segments its days fall in.
 * boundary-placements.ts covers the knife edges the on-changepoint rule
 * creates.
 */
import type { ChangepointOptimum, HingeShape } from '../changepoint-search.js';
import { originalTemperature, type BillDays } from './bill-days.js';
import { bothSidesFeasible, sweepHinge } from './hinge-sweep.js';
import { searchFivePoint } from './five-point.js';
import { searchFivePointWithBasis } from './five-point-basis.js';
import { boundaryOnlyFivePoint, boundaryOnlyOneChangepoint } from './boundary-placements.js';

export { buildBillDays, type BillDays } from './bill-days.js';

/**
 * Exact least-squares changepoint(s) of one hinge shape in the day-resolved
 * form, or null when no placement leaves `minPoints` readings in every segment.
 */
export function searchDayResolved(days: BillDays, shape: HingeShape, minPoints: number): ChangepointOptimum | null {
  const k = Math.max(1, minPoints);
  let heating: number | null = null;
  let cooling: number | null = null;
  let sse = Number.POSITIVE_INFINITY;
  if (shape === '5P') {
    const pairs = days.extras.length > 0 ? searchFivePointWithBasis(days, k) : searchFivePoint(days, k);
    for (const candidate of [pairs, boundaryOnlyFivePoint(days, k)]) {
      if (candidate && candidate.sse < sse) ({ heating, cooling, sse } = candidate);
    }
  } else {
    const side = shape === '3PC' ? 'cooling' : 'heating';
    const inside = sweepHinge(days, side, shape === '4P' ? days.mean : null, bothSidesFeasible(days, k));
    for (const candidate of [inside, boundaryOnlyOneChangepoint(days, shape, k)]) {
      if (candidate && candidate.sse < sse) {
        sse = candidate.sse;
        heating = shape === '3PC' ? null : candidate.tau;
        cooling = shape === '3PH' ? null : candidate.tau;
      }
    }
  }
  if (!Number.isFinite(sse)) return null;
  return {
    heatingChangepoint: heating === null ? null : originalTemperature(days, heating),
    coolingChangepoint: cooling === null ? null : originalTemperature(days, cooling),
    sse,
  };
}
