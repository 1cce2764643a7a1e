/**
 * Placements that the segment rule admits only on a breakpoint.
 *
 * A reading on a changepoint counts in both segments it touches, so a
 * changepoint placed exactly on a reading's mean temperature can satisfy
 * two segment counts at once where no placement beside it does (say the one
 * reading that is both the third-warmest and the third reading of the flat
 * band). The interval searches look at open intervals and their closures, so
 * they miss such knife-edge placements; this module finds them: for the
 * one-changepoint shapes single points, for the 5P whole lines (one
 * changepoint on a reading's mean, the other free on an interval, solved by
 * a restricted sweep) and points (both on means). They are rare in real
 * bills, but exactness means the least-squares optimum over the feasible set
 * the rule defines, knife edges included.
 */
import type { BillDays } from './bill-days.js';
import { bothSidesFeasible, fixedColumnsSse, hingeColumn, sweepHinge, type Side } from './hinge-sweep.js';
import { fixedFivePointSse, type FivePointOptimum } from './five-point.js';

/** Breakpoint indices that are reading means, with how many readings share each. */
function meanBreakpoints(days: BillDays): { index: number; readings: number }[] {
  const out: { index: number; readings: number }[] = [];
  for (let j = 0; j < days.breakpoints.length; j++) {
    const readings = days.meansAtOrBelow[j]! - (j > 0 ? days.meansAtOrBelow[j - 1]! : 0);
    if (readings > 0) out.push({ index: j, readings });
  }
  return out;
}

/** The best one-changepoint placement that sits exactly on a reading's mean where no interval beside it is allowed. */
export function boundaryOnlyOneChangepoint(days: BillDays, shape: '3PC' | '3PH' | '4P', k: number): { tau: number; sse: number } | null {
  const allowed = bothSidesFeasible(days, k);
  const count = days.breakpoints.length;
  let best: { tau: number; sse: number } | null = null;
  for (const { index: j } of meanBreakpoints(days)) {
    if (days.meansAtOrBelow[j]! < k || days.meansAtOrAbove[j]! < k) continue;
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
 * The best 5P placement on a line or point that the segment rule admits but
 * no open pair of intervals next to it does.
 */
export function boundaryOnlyFivePoint(days: BillDays, k: number): FivePointOptimum | null {
  const { n, breakpoints, meansAtOrBelow: atOrBelow, meansAtOrAbove: atOrAbove } = days;
  const count = breakpoints.length;
  // Readings with mean in [bp[a], bp[b]] (a ≤ b); and in [bp[a+1], bp[b]] is flatBetween(a + 1, b).
  const flatBetween = (a: number, b: number): number => (a > b ? 0 : atOrBelow[b]! - (n - atOrAbove[a]!));
  // Open rectangle (heating interval i, cooling interval j > i) and open lines, as the pair search sees them.
  const rect = (i: number, j: number): boolean =>
    i >= 0 && j > i && j + 1 < count && atOrBelow[i]! >= k && atOrAbove[j + 1]! >= k && flatBetween(i + 1, j) >= k;
  // τc on breakpoint t, τh inside heating interval i.
  const coolingLine = (i: number, t: number): boolean =>
    i >= 0 && i + 1 <= t && atOrBelow[i]! >= k && flatBetween(i + 1, t) >= k && atOrAbove[t]! >= k;
  // τh on breakpoint t, τc inside cooling interval j.
  const heatingLine = (t: number, j: number): boolean =>
    j >= t && j + 1 < count && atOrBelow[t]! >= k && flatBetween(t, j) >= k && atOrAbove[j + 1]! >= k;

  let best: FivePointOptimum | null = null;
  const offer = (candidate: FivePointOptimum | null): void => {
    if (candidate && Number.isFinite(candidate.sse) && (best === null || candidate.sse < best.sse)) best = candidate;
  };
  const means = meanBreakpoints(days);

  for (const { index: t } of means) {
    // Lines τc = bp[t]: heating intervals where the line is allowed but neither rectangle beside it is.
    const heatingMask = new Uint8Array(count);
    let any = false;
    for (let i = 0; i + 1 <= t; i++) {
      if (coolingLine(i, t) && !rect(i, t - 1) && !rect(i, t)) {
        heatingMask[i] = 1;
        any = true;
      }
    }
    if (any) offer(lineOptimum(days, 'heating', breakpoints[t]!, heatingMask));
    // Lines τh = bp[t]: cooling intervals likewise.
    const coolingMask = new Uint8Array(count);
    any = false;
    for (let j = t; j + 1 < count; j++) {
      if (heatingLine(t, j) && !rect(t - 1, j) && !rect(t, j)) {
        coolingMask[j] = 1;
        any = true;
      }
    }
    if (any) offer(lineOptimum(days, 'cooling', breakpoints[t]!, coolingMask));
  }

  // Points: both changepoints on means, allowed there but on no open line next to them.
  for (const { index: a } of means) {
    for (const { index: b } of means) {
      if (b < a) continue;
      const pointAllowed = atOrBelow[a]! >= k && flatBetween(a, b) >= k && atOrAbove[b]! >= k;
      if (!pointAllowed) continue;
      const lineNearby = heatingLine(a, b) || heatingLine(a, b - 1) || coolingLine(a - 1, b) || coolingLine(a, b);
      if (lineNearby) continue;
      offer({ heating: breakpoints[a]!, cooling: breakpoints[b]!, sse: fixedFivePointSse(days, breakpoints[a]!, breakpoints[b]!) });
    }
  }
  return best;
}

/** One changepoint fixed at `fixedAt`, the other swept over the intervals in `mask`. */
function lineOptimum(days: BillDays, moving: Side, fixedAt: number, mask: Uint8Array): FivePointOptimum | null {
  const fixedSide: Side = moving === 'heating' ? 'cooling' : 'heating';
  const result = sweepHinge(days, moving, hingeColumn(days, fixedSide, fixedAt), mask);
  if (!result) return null;
  return moving === 'heating' ? { heating: result.tau, cooling: fixedAt, sse: result.sse } : { heating: fixedAt, cooling: result.tau, sse: result.sse };
}
