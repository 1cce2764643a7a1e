/**
 * Readings as the day-resolved search sees them: each reading's weight, use
 * per day and mean temperature, and every day of weather behind them sorted
 * by temperature, with the breakpoints where anything can change.
 *
 * A reading's heating term mean(τ − T_d)₊ is affine in τ between two
 * adjacent distinct daily temperatures, and so is every other column; a
 * segment's weight (each reading counted by the share of its days that fall
 * in the segment, a day on a changepoint counting in both segments) changes
 * only there too. So the breakpoints are the distinct daily temperatures, and
 * on each interval between two adjacent ones every column of every shape is
 * affine in τ and every segment rule is constant.
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
  /** Distinct daily temperatures, ascending, centred. */
  breakpoints: Float64Array;
  /** The same breakpoints in the caller's units. */
  breakpointsOriginal: Float64Array;
  /** Days at breakpoint j are dayTemp[dayStart[j] .. dayStart[j + 1]). */
  dayStart: Int32Array;
  /** Σ over readings of the share of their days at or below breakpoint j: the weight of a segment ending there. */
  weightAtOrBelow: Float64Array;
  /** Σ over readings of the share of their days at or above breakpoint j. */
  weightAtOrAbove: Float64Array;
  /** Σw·y² of the centred use: the SSE of the mean model. */
  totalSquares: number;
  /** The weighted means removed. */
  tempShift: number;
  useShift: number;
  /**
   * Extra fixed columns every fit of this view carries beside the intercept
   * (independent variables, day-type indicators), one value per reading,
   * centred on their weighted means. Empty for a weather-only model.
   */
  extras: readonly Float64Array[];
}

/** Views with extra columns, per base view and column set. */
const withColumns = new WeakMap<BillDays, Map<string, BillDays>>();

/**
 * The same view with extra fixed columns (one array per column, one value
 * per reading in the view's reading order), centred on their weighted means
 * (the intercept is always in the model, so centring changes no fit, only
 * the conditioning). `key` names the column set for the cache.
 */
export function withExtraColumns(days: BillDays, key: string, columns: readonly (readonly number[])[]): BillDays {
  if (columns.length === 0) return days;
  let cache = withColumns.get(days);
  if (!cache) {
    cache = new Map();
    withColumns.set(days, cache);
  }
  const cached = cache.get(key);
  if (cached) return cached;
  let weight = 0;
  for (let b = 0; b < days.n; b++) weight += days.w[b]!;
  const extras = columns.map((column) => {
    if (column.length !== days.n) throw new RangeError(`an extra column needs ${days.n} values, got ${column.length}`);
    let mean = 0;
    for (let b = 0; b < days.n; b++) mean += days.w[b]! * column[b]!;
    mean /= weight;
    return Float64Array.from(column, (value) => value - mean);
  });
  const view = { ...days, extras };
  cache.set(key, view);
  return view;
}

/** Views already built, per periods array (the shapes of one choice share one). */
const built = new WeakMap<readonly Period[], BillDays>();

/** The search's view of these periods, built once per periods array. */
export function billDaysOf(periods: readonly Period[]): BillDays {
  let days = built.get(periods);
  if (!days) {
    days = buildBillDays(periods);
    built.set(periods, days);
  }
  return days;
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
    if (!temps || temps.length === 0)
      throw new RangeError('the day-resolved form needs the daily temperatures of every period');
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

  // Breakpoints: the distinct day temperatures, with the segment weights at each.
  const originals: number[] = [];
  const starts: number[] = [];
  for (let i = 0; i < totalDays;) {
    const value = originalDay[order[i]!]!;
    originals.push(value);
    starts.push(i);
    while (i < totalDays && originalDay[order[i]!]! === value) i++;
  }
  starts.push(totalDays);
  const count = originals.length;
  const breakpoints = new Float64Array(count);
  const weightAtOrBelow = new Float64Array(count);
  const weightAtOrAbove = new Float64Array(count);
  let below = 0;
  for (let j = 0; j < count; j++) {
    breakpoints[j] = originals[j]! - tempShift;
    for (let d = starts[j]!; d < starts[j + 1]!; d++) below += dayShare[d]!;
    weightAtOrBelow[j] = below;
  }
  let above = 0;
  for (let j = count - 1; j >= 0; j--) {
    for (let d = starts[j]!; d < starts[j + 1]!; d++) above += dayShare[d]!;
    weightAtOrAbove[j] = above;
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
    weightAtOrBelow,
    weightAtOrAbove,
    totalSquares,
    tempShift,
    useShift,
    extras: [],
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

/** Rounding slack when a segment weight (a sum of day shares) is compared with a whole number of readings. */
const WEIGHT_SLACK = 1e-9;

/** Does a segment of this weight hold at least k readings' worth of days? */
export function enough(weight: number, k: number): boolean {
  return weight >= k - WEIGHT_SLACK;
}

/** Index of the last breakpoint at or below τ (centred), or −1. */
function lastAtOrBelow(days: BillDays, tau: number): number {
  const points = days.breakpoints;
  let low = 0;
  let high = points.length;
  while (low < high) {
    const mid = (low + high) >> 1;
    if (points[mid]! <= tau) low = mid + 1;
    else high = mid;
  }
  return low - 1;
}

/** Weight of the days at or below τ (centred). */
export function weightAtOrBelowTemperature(days: BillDays, tau: number): number {
  const j = lastAtOrBelow(days, tau);
  return j < 0 ? 0 : days.weightAtOrBelow[j]!;
}

/** Weight of the days at or above τ (centred). */
export function weightAtOrAboveTemperature(days: BillDays, tau: number): number {
  const j = lastAtOrBelow(days, tau);
  if (j >= 0 && days.breakpoints[j] === tau) return days.weightAtOrAbove[j]!;
  return j + 1 < days.breakpoints.length ? days.weightAtOrAbove[j + 1]! : 0;
}

/** Weight of the days in [low, high] (centred). */
export function weightBetween(days: BillDays, low: number, high: number): number {
  if (!(low <= high)) return 0;
  return Math.max(0, weightAtOrBelowTemperature(days, high) - (days.n - weightAtOrAboveTemperature(days, low)));
}
