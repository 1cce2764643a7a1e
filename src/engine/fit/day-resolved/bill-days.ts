/**
 * Readings as the day-resolved search sees them: each reading's weight, use
 * per day and mean temperature, and every day of weather behind them sorted
 * by temperature, with the breakpoints where anything can change.
 *
 * A reading's heating term mean(τ − T_d)₊ is affine in τ between two
 * adjacent distinct daily temperatures, and the segment counts (readings
 * counted by their mean temperature) change only at reading means; so the
 * breakpoints are the union of both, and on each interval between two
 * adjacent breakpoints every column of every shape is affine in τ and every
 * feasibility rule is constant.
 *
 * Temperatures and use are centred on their weighted means, which keeps the
 * inner products well conditioned; the original breakpoint values are kept
 * so that a changepoint on a breakpoint comes back exactly.
 */
import type { Period } from '../../types.js';

export interface BillDays {
  /** Readings. */
  n: number;
  /** Weight of each reading: its days. */
  w: Float64Array;
  /** Use per day, centred on its weighted mean. */
  y: Float64Array;
  /** Mean temperature of each reading (over its days with weather), centred. */
  mean: Float64Array;
  /** Days with weather of each reading (the divisor of its day-resolved terms). */
  dayCount: Float64Array;
  /** Highest and lowest daily temperature of each reading, centred. */
  maxTemp: Float64Array;
  minTemp: Float64Array;
  /** Every day's temperature (centred), ascending, and the reading it belongs to. */
  dayTemp: Float64Array;
  dayBill: Int32Array;
  /** Each sorted day's share of its reading (1/m) and its temperature's share (T/m): what one day adds to s and S. */
  dayShare: Float64Array;
  dayTempShare: Float64Array;
  /** Distinct daily temperatures and reading means, ascending, centred. */
  breakpoints: Float64Array;
  /** The same breakpoints in the caller's units. */
  breakpointsOriginal: Float64Array;
  /** Days at breakpoint j are dayTemp[dayStart[j] .. dayStart[j + 1]). */
  dayStart: Int32Array;
  /** Readings whose mean is at or below breakpoint j. */
  meansAtOrBelow: Int32Array;
  /** Readings whose mean is at or above breakpoint j. */
  meansAtOrAbove: Int32Array;
  /** Σw·y² of the centred use: the SSE of the mean model. */
  totalSquares: number;
  /** The weighted means removed. */
  tempShift: number;
  useShift: number;
}

/** Build the search's view of periods that carry their days' temperatures. */
export function buildBillDays(periods: readonly Period[]): BillDays {
  const n = periods.length;
  const w = new Float64Array(n);
  const rawY = new Float64Array(n);
  const rawMean = new Float64Array(n);
  const dayCount = new Float64Array(n);
  let totalDays = 0;
  for (let b = 0; b < n; b++) {
    const period = periods[b]!;
    const temps = period.dayTemps;
    if (!temps || temps.length === 0) throw new RangeError('the day-resolved form needs the daily temperatures of every period');
    w[b] = period.days;
    rawY[b] = period.usePerDay;
    dayCount[b] = temps.length;
    let sum = 0;
    for (const temp of temps) sum += temp;
    rawMean[b] = sum / temps.length;
    totalDays += temps.length;
  }
  let weight = 0;
  let weightedTemp = 0;
  let weightedUse = 0;
  for (let b = 0; b < n; b++) {
    weight += w[b]!;
    weightedTemp += w[b]! * rawMean[b]!;
    weightedUse += w[b]! * rawY[b]!;
  }
  const tempShift = weightedTemp / weight;
  const useShift = weightedUse / weight;

  const y = new Float64Array(n);
  const mean = new Float64Array(n);
  const maxTemp = new Float64Array(n).fill(Number.NEGATIVE_INFINITY);
  const minTemp = new Float64Array(n).fill(Number.POSITIVE_INFINITY);
  let totalSquares = 0;
  for (let b = 0; b < n; b++) {
    y[b] = rawY[b]! - useShift;
    mean[b] = rawMean[b]! - tempShift;
    totalSquares += w[b]! * y[b]! * y[b]!;
  }

  // Every day, sorted by temperature (ties by reading, so the order is deterministic).
  const originalDay = new Float64Array(totalDays);
  const billOf = new Int32Array(totalDays);
  let d = 0;
  for (let b = 0; b < n; b++) {
    for (const temp of periods[b]!.dayTemps!) {
      originalDay[d] = temp;
      billOf[d] = b;
      d++;
    }
  }
  const order = new Int32Array(totalDays);
  for (let i = 0; i < totalDays; i++) order[i] = i;
  order.sort((p, q) => originalDay[p]! - originalDay[q]! || billOf[p]! - billOf[q]!);
  const dayTemp = new Float64Array(totalDays);
  const dayBill = new Int32Array(totalDays);
  const dayShare = new Float64Array(totalDays);
  const dayTempShare = new Float64Array(totalDays);
  for (let i = 0; i < totalDays; i++) {
    const from = order[i]!;
    dayTemp[i] = originalDay[from]! - tempShift;
    dayBill[i] = billOf[from]!;
    const b = dayBill[i]!;
    dayShare[i] = 1 / dayCount[b]!;
    dayTempShare[i] = dayTemp[i]! / dayCount[b]!;
    if (dayTemp[i]! > maxTemp[b]!) maxTemp[b] = dayTemp[i]!;
    if (dayTemp[i]! < minTemp[b]!) minTemp[b] = dayTemp[i]!;
  }

  // Breakpoints: distinct day temperatures merged with distinct reading means.
  const sortedMeans = Array.from(rawMean).sort((p, q) => p - q);
  const originals: number[] = [];
  const starts: number[] = [];
  let i = 0;
  let k = 0;
  while (i < totalDays || k < n) {
    const dayValue = i < totalDays ? originalDay[order[i]!]! : Number.POSITIVE_INFINITY;
    const meanValue = k < n ? sortedMeans[k]! : Number.POSITIVE_INFINITY;
    const value = Math.min(dayValue, meanValue);
    originals.push(value);
    starts.push(i);
    while (i < totalDays && originalDay[order[i]!]! === value) i++;
    while (k < n && sortedMeans[k]! === value) k++;
  }
  starts.push(totalDays);
  const count = originals.length;
  const breakpoints = new Float64Array(count);
  const meansAtOrBelow = new Int32Array(count);
  const meansAtOrAbove = new Int32Array(count);
  let below = 0;
  for (let j = 0; j < count; j++) {
    breakpoints[j] = originals[j]! - tempShift;
    while (below < n && sortedMeans[below]! <= originals[j]!) below++;
    meansAtOrBelow[j] = below;
  }
  let above = 0;
  for (let j = count - 1; j >= 0; j--) {
    while (above < n && sortedMeans[n - 1 - above]! >= originals[j]!) above++;
    meansAtOrAbove[j] = above;
  }
  return {
    n,
    w,
    y,
    mean,
    dayCount,
    maxTemp,
    minTemp,
    dayTemp,
    dayBill,
    dayShare,
    dayTempShare,
    breakpoints,
    breakpointsOriginal: Float64Array.from(originals),
    dayStart: Int32Array.from(starts),
    meansAtOrBelow,
    meansAtOrAbove,
    totalSquares,
    tempShift,
    useShift,
  };
}

/**
 * A centred changepoint back in the caller's units: a breakpoint comes back
 * as its exact original value (adding the shift back could move it by an
 * ulp, off the day it sits on).
 */
export function originalTemperature(days: BillDays, centred: number): number {
  const points = days.breakpoints;
  let low = 0;
  let high = points.length - 1;
  while (low < high) {
    const mid = (low + high) >> 1;
    if (points[mid]! < centred) low = mid + 1;
    else high = mid;
  }
  return points[low] === centred ? days.breakpointsOriginal[low]! : centred + days.tempShift;
}
