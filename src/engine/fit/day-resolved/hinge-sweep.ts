/**
 * One moving hinge of the day-resolved form: a sweep over the breakpoints
 * (see bill-days.ts) that keeps the inner products of the hinge column with
 * the fixed columns and with y current, one day at a time, and finds the
 * hinge's exact best position on every allowed interval (gram.ts). Also the
 * hinge columns and SSE of fixed changepoints, which the 5P search and the
 * boundary placements use.
 */
import { bestHingeOnInterval, gramLeastSquares, type HingeOptimum } from '../gram.js';
import { enough, type BillDays } from './bill-days.js';
import { sweepHingeWithBasis } from './basis-sweep.js';

export type Side = 'heating' | 'cooling';

/** Interval j of a one-changepoint shape is allowed when both sides keep k readings' worth of days. */
export function bothSidesFeasible(days: BillDays, k: number): Uint8Array {
  const allowed = new Uint8Array(days.breakpoints.length);
  for (let j = 0; j + 1 < allowed.length; j++)
    allowed[j] = enough(days.weightAtOrBelow[j]!, k) && enough(days.weightAtOrAbove[j + 1]!, k) ? 1 : 0;
  return allowed;
}

/**
 * The best position of one hinge (heating or cooling) beside the intercept and
 * an optional fixed column, over every breakpoint interval j with
 * `allowed[j]`. Gram layout [1, extra?, u, v, y], where a reading's hinge is
 * u + τ·v: heating u = −S, v = s; cooling u = mean − S, v = s − 1 (s the
 * share of its days at or below the interval, S their temperatures summed
 * over its days). Each day passed adds 1/m to s and T/m to S, for both.
 */
export function sweepHinge(
  days: BillDays,
  side: Side,
  extra: Float64Array | null,
  allowed: Uint8Array,
  onPoint?: (tau: number, sse: number) => void,
): HingeOptimum | null {
  // A view with independent variables carries them as fixed columns: the general sweep.
  if (days.extras.length > 0) return sweepHingeWithBasis(days, side, extra ? [extra] : [], allowed, onPoint);
  const { n, w, y, mean, breakpoints, dayStart, dayBill, dayShare, dayTempShare } = days;
  const f = extra ? 2 : 1;
  const m = f + 3;
  const iu = f;
  const iv = f + 1;
  const iy = f + 2;
  const gram = new Float64Array(m * m);
  const us = new Float64Array(n);
  const vs = new Float64Array(n);

  let g1u = 0,
    g1v = 0,
    geu = 0,
    gev = 0,
    guu = 0,
    guv = 0,
    gvv = 0,
    guy = 0,
    gvy = 0;
  let g11 = 0,
    g1e = 0,
    gee = 0,
    gey = 0;
  for (let b = 0; b < n; b++) {
    const u = side === 'heating' ? 0 : mean[b]!;
    const v = side === 'heating' ? 0 : -1;
    us[b] = u;
    vs[b] = v;
    const wb = w[b]!;
    const e = extra ? extra[b]! : 0;
    g11 += wb;
    g1e += wb * e;
    gee += wb * e * e;
    gey += wb * e * y[b]!;
    g1u += wb * u;
    g1v += wb * v;
    geu += wb * e * u;
    gev += wb * e * v;
    guu += wb * u * u;
    guv += wb * u * v;
    gvv += wb * v * v;
    guy += wb * u * y[b]!;
    gvy += wb * v * y[b]!;
  }
  gram[0] = g11;
  gram[iy] = gram[iy * m] = 0;
  gram[iy * m + iy] = days.totalSquares;
  if (extra) {
    gram[1] = gram[m] = g1e;
    gram[m + 1] = gee;
    gram[m + iy] = gram[iy * m + 1] = gey;
  }

  let found = false;
  const best: HingeOptimum = { tau: Number.NaN, sse: Number.POSITIVE_INFINITY };
  const candidate: HingeOptimum = { tau: Number.NaN, sse: Number.POSITIVE_INFINITY };
  for (let j = 0; j + 1 < breakpoints.length; j++) {
    for (let d = dayStart[j]!; d < dayStart[j + 1]!; d++) {
      const b = dayBill[d]!;
      const uOld = us[b]!;
      const vOld = vs[b]!;
      const uNew = uOld - dayTempShare[d]!;
      const vNew = vOld + dayShare[d]!;
      us[b] = uNew;
      vs[b] = vNew;
      const wb = w[b]!;
      const du = wb * (uNew - uOld);
      const dv = wb * (vNew - vOld);
      g1u += du;
      g1v += dv;
      if (extra) {
        geu += extra[b]! * du;
        gev += extra[b]! * dv;
      }
      guu += wb * (uNew * uNew - uOld * uOld);
      guv += wb * (uNew * vNew - uOld * vOld);
      gvv += wb * (vNew * vNew - vOld * vOld);
      guy += y[b]! * du;
      gvy += y[b]! * dv;
    }
    if (allowed[j] === 0) continue;
    gram[iu] = gram[iu * m] = g1u;
    gram[iv] = gram[iv * m] = g1v;
    if (extra) {
      gram[m + iu] = gram[iu * m + 1] = geu;
      gram[m + iv] = gram[iv * m + 1] = gev;
    }
    gram[iu * m + iu] = guu;
    gram[iu * m + iv] = gram[iv * m + iu] = guv;
    gram[iv * m + iv] = gvv;
    gram[iu * m + iy] = gram[iy * m + iu] = guy;
    gram[iv * m + iy] = gram[iy * m + iv] = gvy;
    if (
      bestHingeOnInterval(gram, f, breakpoints[j]!, breakpoints[j + 1]!, candidate, onPoint) &&
      candidate.sse < best.sse
    ) {
      best.tau = candidate.tau;
      best.sse = candidate.sse;
      found = true;
    }
  }
  return found ? best : null;
}

/** Each reading's heating (or cooling) term at a fixed centred changepoint. */
export function hingeColumn(days: BillDays, side: Side, tau: number): Float64Array {
  const column = new Float64Array(days.n);
  for (let d = 0; d < days.dayTemp.length; d++) {
    const t = days.dayTemp[d]!;
    const b = days.dayBill[d]!;
    if (side === 'heating' ? t < tau : t > tau) column[b] = column[b]! + Math.abs(tau - t) * days.dayShare[d]!;
  }
  return column;
}

/**
 * SSE of the intercept, the view's extra columns and the given fixed columns
 * (centred units), or +∞ when they are collinear.
 */
export function fixedColumnsSse(days: BillDays, given: readonly Float64Array[]): number {
  const columns = days.extras.length > 0 ? [...days.extras, ...given] : given;
  const m = columns.length + 2;
  const gram = new Float64Array(m * m);
  const values = new Float64Array(m);
  for (let b = 0; b < days.n; b++) {
    values[0] = 1;
    for (let c = 0; c < columns.length; c++) values[c + 1] = columns[c]![b]!;
    values[m - 1] = days.y[b]!;
    for (let a = 0; a < m; a++) for (let q = 0; q < m; q++) gram[a * m + q]! += days.w[b]! * values[a]! * values[q]!;
  }
  return gramLeastSquares(gram, m) ?? Number.POSITIVE_INFINITY;
}
