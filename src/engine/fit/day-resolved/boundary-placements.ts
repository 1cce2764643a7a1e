/**
 * Placements that the segment rule admits only on a breakpoint.
 *
 * A day on a changepoint counts in both segments it touches, so a
 * changepoint placed exactly on a daily temperature can satisfy two segment
 * weights at once where no placement beside it does (say the days that are
 * both the last of the cooling segment's three readings' worth and the last
 * of the flat band's). The interval searches look at open intervals and their closures, so
 * they miss such knife-edge placements; this module finds them: for the
 * one-changepoint shapes single points, for the 5P whole lines (one
 * changepoint on a reading's mean, the other free on an interval, solved by
 * a restricted sweep) and points (both on means). They are rare in real
 * bills, but exactness means the least-squares optimum over the feasible set
 * the rule defines, knife edges included.
 */
import { enough, type BillDays } from './bill-days.js';
import { bothSidesFeasible, fixedColumnsSse, hingeColumn, sweepHinge, type Side } from './hinge-sweep.js';
import { fixedFivePointSse, type FivePointOptimum } from './five-point.js';

/** The best one-changepoint placement that sits exactly on a reading's mean where no interval beside it is allowed. */
export function boundaryOnlyOneChangepoint(
  days: BillDays,
  shape: '3PC' | '3PH' | '4P',
  k: number,
): { tau: number; sse: number } | null {
  const allowed = bothSidesFeasible(days, k);
  const count = days.breakpoints.length;
  let best: { tau: number; sse: number } | null = null;
  const { heating, cooling } = crossings(days, k);
  for (const j of new Set([heating, cooling])) {
    if (j < 0) continue;
    if (!enough(days.weightAtOrBelow[j]!, k) || !enough(days.weightAtOrAbove[j]!, k)) continue;
    const leftAllowed = j >= 1 && allowed[j - 1] === 1;
    const rightAllowed = j + 1 < count && allowed[j] === 1;
    if (leftAllowed || rightAllowed) continue;
    const tau = days.breakpoints[j]!;
    const columns =
      shape === '3PH'
        ? [hingeColumn(days, 'heating', tau)]
        : shape === '3PC'
          ? [hingeColumn(days, 'cooling', tau)]
          : [hingeColumn(days, 'heating', tau), days.mean];
    const sse = fixedColumnsSse(days, columns);
    if (Number.isFinite(sse) && (best === null || sse < best.sse)) best = { tau, sse };
  }
  return best;
}

/**
 * Where a segment weight reaches k readings' worth of days: the first
 * breakpoint whose weight at or below it is enough, and the last whose
 * weight at or above it is. A placement that is allowed only on a breakpoint
 * must sit exactly there (moving off it loses that breakpoint's days from
 * one of the segments, which then falls short), so these two are the only
 * candidates.
 */
function crossings(days: BillDays, k: number): { heating: number; cooling: number } {
  const count = days.breakpoints.length;
  let heating = -1;
  for (let j = 0; j < count; j++) {
    if (enough(days.weightAtOrBelow[j]!, k)) {
      heating = j;
      break;
    }
  }
  let cooling = -1;
  for (let j = count - 1; j >= 0; j--) {
    if (enough(days.weightAtOrAbove[j]!, k)) {
      cooling = j;
      break;
    }
  }
  return { heating, cooling };
}

/**
 * The best 5P placement on a line or point that the segment rule admits but
 * no open pair of intervals next to it does. On such a line one changepoint
 * sits on a breakpoint whose days both its segments need, so it is the
 * heating or the cooling crossing (see crossings); on such a point both are.
 */
export function boundaryOnlyFivePoint(days: BillDays, k: number): FivePointOptimum | null {
  const { n, breakpoints, weightAtOrBelow: atOrBelow, weightAtOrAbove: atOrAbove } = days;
  const count = breakpoints.length;
  // Weight of the days in [bp[a], bp[b]] (a ≤ b); in [bp[a+1], bp[b]] is flatBetween(a + 1, b).
  const flatBetween = (a: number, b: number): number => (a > b ? 0 : atOrBelow[b]! - (n - atOrAbove[a]!));
  // Open rectangle (heating interval i, cooling interval j > i) and open lines, as the pair search sees them.
  const rect = (i: number, j: number): boolean =>
    i >= 0 &&
    j > i &&
    j + 1 < count &&
    enough(atOrBelow[i]!, k) &&
    enough(atOrAbove[j + 1]!, k) &&
    enough(flatBetween(i + 1, j), k);
  // τc on breakpoint t, τh inside heating interval i.
  const coolingLine = (i: number, t: number): boolean =>
    i >= 0 && i + 1 <= t && enough(atOrBelow[i]!, k) && enough(flatBetween(i + 1, t), k) && enough(atOrAbove[t]!, k);
  // τh on breakpoint t, τc inside cooling interval j.
  const heatingLine = (t: number, j: number): boolean =>
    t >= 0 &&
    j >= t &&
    j + 1 < count &&
    enough(atOrBelow[t]!, k) &&
    enough(flatBetween(t, j), k) &&
    enough(atOrAbove[j + 1]!, k);

  let best: FivePointOptimum | null = null;
  const offer = (candidate: FivePointOptimum | null): void => {
    if (candidate && Number.isFinite(candidate.sse) && (best === null || candidate.sse < best.sse)) best = candidate;
  };
  const { heating: a, cooling: b } = crossings(days, k);
  if (a < 0 || b < 0) return null;

  // The line τc = bp[b]: heating intervals where it is allowed but neither rectangle beside it is.
  const heatingMask = new Uint8Array(count);
  let any = false;
  for (let i = 0; i + 1 <= b; i++) {
    if (coolingLine(i, b) && !rect(i, b - 1) && !rect(i, b)) {
      heatingMask[i] = 1;
      any = true;
    }
  }
  if (any) offer(lineOptimum(days, 'heating', breakpoints[b]!, heatingMask));
  // The line τh = bp[a]: cooling intervals likewise.
  const coolingMask = new Uint8Array(count);
  any = false;
  for (let j = a; j + 1 < count; j++) {
    if (heatingLine(a, j) && !rect(a - 1, j) && !rect(a, j)) {
      coolingMask[j] = 1;
      any = true;
    }
  }
  if (any) offer(lineOptimum(days, 'cooling', breakpoints[a]!, coolingMask));
  // The point (bp[a], bp[b]), allowed there but on no open line next to it.
  if (a <= b && enough(atOrBelow[a]!, k) && enough(flatBetween(a, b), k) && enough(atOrAbove[b]!, k)) {
    const lineNearby = heatingLine(a, b) || heatingLine(a, b - 1) || coolingLine(a - 1, b) || coolingLine(a, b);
    if (!lineNearby)
      offer({
        heating: breakpoints[a]!,
        cooling: breakpoints[b]!,
        sse: fixedFivePointSse(days, breakpoints[a]!, breakpoints[b]!),
      });
  }
  return best;
}

/** One changepoint fixed at `fixedAt`, the other swept over the intervals in `mask`. */
function lineOptimum(days: BillDays, moving: Side, fixedAt: number, mask: Uint8Array): FivePointOptimum | null {
  const fixedSide: Side = moving === 'heating' ? 'cooling' : 'heating';
  const result = sweepHinge(days, moving, hingeColumn(days, fixedSide, fixedAt), mask);
  if (!result) return null;
  return moving === 'heating'
    ? { heating: result.tau, cooling: fixedAt, sse: result.sse }
    : { heating: fixedAt, cooling: result.tau, sse: result.sse };
}
