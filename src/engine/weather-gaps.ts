/**
 * Gaps in a station's daily record, filled on record and never silently:
 * - a short gap (at most `maxInterpolationDays`, 2 by default: a limit of
 *   our own) lying between two observed days is filled by linear
 *   interpolation between them (common practice);
 * - a longer gap, or one at an end of the record, is filled from a second
 *   station by a line fitted to the days both observed,
 *   t = a + b·t₂ (ordinary least squares), with its RMSE = √(SSE/(n − 2))
 *   stated beside every day it fills; the fit needs at least
 *   `minOverlapDays` shared days (30 by default, our own);
 * - anything else is left empty and reported.
 * Only observed days serve as neighbours and as the overlap: a filled day
 * never feeds another fill.
 */
import type { DailyTemperature } from './types.js';
import { formatDayNumber, parseIsoDate } from './dates.js';

export type FillMethod = 'interpolation' | 'second-station';
export const FILL_METHODS: readonly FillMethod[] = ['interpolation', 'second-station'];

export const DEFAULT_MAX_INTERPOLATION_DAYS = 2;
export const DEFAULT_MIN_OVERLAP_DAYS = 30;

/** A run of days without an observation: its part inside the window, [start, end), and the whole run. */
export interface WeatherGap {
  start: string;
  end: string;
  days: number;
  /** The whole run, which may reach beyond the window (up to a year each way is looked at). */
  runStart: string;
  runEnd: string;
  runDays: number;
  /** The observed days on either side of the whole run, when the record has them. */
  before: DailyTemperature | null;
  after: DailyTemperature | null;
}

export interface FilledDay {
  date: string;
  temp: number;
  method: FillMethod;
  /** What it was filled from, in words with the numbers. */
  note: string;
}

/** The line t = intercept + slope·t₂ fitted on the days both stations observed. */
export interface StationOffset {
  intercept: number;
  slope: number;
  /** √(SSE/(n − 2)), in the target station's unit. */
  rmse: number;
  overlapDays: number;
}

export interface GapFillOptions {
  maxInterpolationDays?: number;
  /** The second station's observed days (in the target's unit), and how to name it. */
  secondStation?: { label: string; days: readonly DailyTemperature[] };
  minOverlapDays?: number;
}

export interface GapFillPlan {
  gaps: WeatherGap[];
  filled: FilledDay[];
  /** Days of [from, to) still without a temperature after the fill. */
  leftEmpty: string[];
  /** The fitted line, when a second station was given and overlapped enough. */
  offset: StationOffset | null;
  /** Why the second station was not used, when it was given but could not be. */
  offsetRefused: string | null;
}

/**
 * The gaps of [from, to) in `observed` (observed days only; any order).
 * Neighbours may lie outside the window: pass the day before and after too.
 */
export function findGaps(observed: readonly DailyTemperature[], from: string, to: string): WeatherGap[] {
  const byDay = dayIndex(observed);
  const first = dayOf(from);
  const last = dayOf(to);
  const gaps: WeatherGap[] = [];
  let d = first;
  while (d < last) {
    if (byDay.has(d)) {
      d++;
      continue;
    }
    const start = d;
    while (d < last && !byDay.has(d)) d++;
    // The run may begin before the window or end after it: its neighbours are the observed days around the whole run.
    let runStart = start;
    while (runStart > first - LOOK_AROUND_DAYS && !byDay.has(runStart - 1)) runStart--;
    let runEnd = d;
    while (runEnd < last + LOOK_AROUND_DAYS && !byDay.has(runEnd)) runEnd++;
    const beforeTemp = byDay.get(runStart - 1);
    const afterTemp = byDay.get(runEnd);
    gaps.push({
      start: formatDayNumber(start),
      end: formatDayNumber(d),
      days: d - start,
      runStart: formatDayNumber(runStart),
      runEnd: formatDayNumber(runEnd),
      runDays: runEnd - runStart,
      before: beforeTemp === undefined ? null : { date: formatDayNumber(runStart - 1), temp: beforeTemp },
      after: afterTemp === undefined ? null : { date: formatDayNumber(runEnd), temp: afterTemp },
    });
  }
  return gaps;
}

/** How far beyond the window a gap's neighbours are looked for. */
const LOOK_AROUND_DAYS = 366;

/** The k-th of n days between a and b: a + (b − a)·k/(n + 1), k = 1..n. */
export function interpolate(before: number, after: number, n: number): number[] {
  return Array.from({ length: n }, (_, i) => before + ((after - before) * (i + 1)) / (n + 1));
}

/** Ordinary least squares of the target on the second station over the days both observed; null below 3 shared days. */
export function fitStationOffset(
  target: readonly DailyTemperature[],
  second: readonly DailyTemperature[],
): StationOffset | null {
  const other = new Map(second.map((d) => [d.date, d.temp]));
  const xs: number[] = [];
  const ys: number[] = [];
  for (const day of target) {
    const x = other.get(day.date);
    if (x !== undefined) {
      xs.push(x);
      ys.push(day.temp);
    }
  }
  const n = xs.length;
  if (n < 3) return null;
  const meanX = xs.reduce((s, x) => s + x, 0) / n;
  const meanY = ys.reduce((s, y) => s + y, 0) / n;
  let sxx = 0;
  let sxy = 0;
  for (let i = 0; i < n; i++) {
    sxx += (xs[i]! - meanX) ** 2;
    sxy += (xs[i]! - meanX) * (ys[i]! - meanY);
  }
  // Centred sums: a constant second station has no slope to fit; it still gives an offset.
  const slope = sxx > 0 ? sxy / sxx : 0;
  const intercept = meanY - slope * meanX;
  let sse = 0;
  for (let i = 0; i < n; i++) sse += (ys[i]! - intercept - slope * xs[i]!) ** 2;
  return { intercept, slope, rmse: Math.sqrt(sse / (n - 2)), overlapDays: n };
}

/**
 * What filling [from, to) would write: interpolation for short bounded gaps,
 * the second station's fitted line for the rest where it observed the day,
 * and the days left empty.
 */
export function planGapFill(
  observed: readonly DailyTemperature[],
  from: string,
  to: string,
  options: GapFillOptions = {},
): GapFillPlan {
  const maxInterpolation = options.maxInterpolationDays ?? DEFAULT_MAX_INTERPOLATION_DAYS;
  const minOverlap = options.minOverlapDays ?? DEFAULT_MIN_OVERLAP_DAYS;
  const gaps = findGaps(observed, from, to);
  const filled: FilledDay[] = [];
  const leftEmpty: string[] = [];
  let offset: StationOffset | null = null;
  let offsetRefused: string | null = null;
  const second = options.secondStation;
  if (second) {
    offset = fitStationOffset(observed, second.days);
    if (!offset || offset.overlapDays < minOverlap) {
      offsetRefused = `${second.label} shares ${offset?.overlapDays ?? 0} observed days with this station; at least ${minOverlap} are needed to fit the offset`;
      offset = null;
    }
  }
  const secondByDate = second ? new Map(second.days.map((d) => [d.date, d.temp])) : new Map<string, number>();
  for (const gap of gaps) {
    const dates = Array.from({ length: gap.days }, (_, i) => formatDayNumber(dayOf(gap.start) + i));
    if (gap.runDays <= maxInterpolation && gap.before && gap.after) {
      const temps = interpolate(gap.before.temp, gap.after.temp, gap.runDays);
      const offsetInRun = dayOf(gap.start) - dayOf(gap.runStart);
      const note = `linear between ${gap.before.date} (${round(gap.before.temp)}) and ${gap.after.date} (${round(gap.after.temp)})`;
      dates.forEach((date, i) => filled.push({ date, temp: temps[offsetInRun + i]!, method: 'interpolation', note }));
      continue;
    }
    for (const date of dates) {
      const x = secondByDate.get(date);
      if (offset && second && x !== undefined) {
        filled.push({
          date,
          temp: offset.intercept + offset.slope * x,
          method: 'second-station',
          note: `${second.label}: t = ${round(offset.intercept, 3)} + ${round(offset.slope, 4)}·t₂ (RMSE ${round(offset.rmse, 2)} over ${offset.overlapDays} days), t₂ = ${round(x)}`,
        });
      } else leftEmpty.push(date);
    }
  }
  return { gaps, filled, leftEmpty, offset, offsetRefused };
}

function dayIndex(days: readonly DailyTemperature[]): Map<number, number> {
  const byDay = new Map<number, number>();
  for (const day of days) byDay.set(dayOf(day.date), day.temp);
  return byDay;
}

function dayOf(date: string): number {
  const day = parseIsoDate(date);
  if (day === null) throw new RangeError(`not an ISO date: ${JSON.stringify(date)}`);
  return day;
}

function round(value: number, digits = 2): string {
  return String(Number(value.toFixed(digits)));
}
