/**
 * Billing periods against daily weather. A reading covers [start, end), so
 * days = end − start; its temperature is the mean of the daily means over the
 * days that have weather, and those days' temperatures are kept with it for
 * the day-resolved form of the fit. A period with too few such days (below the
 * coverage threshold, 90% by default: common practice, not a standard) is
 * left out with its reason stated, never silently.
 */
import { indexVariables, periodVariables, type VariableSeries } from './variables.js';
import type { AlignedPeriods, DailyTemperature, ExcludedPeriod, Period, Reading } from './types.js';
import { formatDayNumber, parseIsoDate } from './dates.js';

export interface AlignmentOptions {
  /** Minimum share of a period's days that must have a temperature (0..1). Default 0.9. */
  minCoverage?: number;
  /**
   * Independent variables to attach to each period (Period.variables): the
   * mean per-day value over its days; a variable missing on any of its days
   * is left off the period, for the fit or the savings to name.
   */
  variableSeries?: readonly VariableSeries[];
}

export const DEFAULT_MIN_COVERAGE = 0.9;

/** Index daily temperatures by date (the last value wins for a repeated date). */
export function indexWeather(weather: readonly DailyTemperature[]): Map<string, number> {
  const byDate = new Map<string, number>();
  for (const day of weather) byDate.set(day.date, day.temp);
  return byDate;
}

/**
 * Align readings with daily weather. Readings are assumed valid (see
 * validate.ts); output periods keep the input order.
 */
export function alignPeriods(
  readings: readonly Reading[],
  weather: DailyWeather,
  options: AlignmentOptions = {},
): AlignedPeriods {
  const minCoverage = options.minCoverage ?? DEFAULT_MIN_COVERAGE;
  if (!(minCoverage > 0 && minCoverage <= 1))
    throw new RangeError(`minCoverage must lie in (0, 1], got ${minCoverage}`);
  const byDay = indexByDayNumber(weather);
  const indexed = indexVariables(options.variableSeries ?? []);
  const periods: Period[] = [];
  const excluded: ExcludedPeriod[] = [];
  readings.forEach((reading, index) => {
    const first = parseIsoDate(reading.start)!;
    const days = parseIsoDate(reading.end)! - first;
    let covered = 0;
    let sum = 0;
    const dayTemps: number[] = [];
    for (let d = first; d < first + days; d++) {
      const temp = byDay.get(d);
      if (temp !== undefined) {
        covered++;
        sum += temp;
        dayTemps.push(temp);
      }
    }
    const coverage = covered / days;
    if (coverage < minCoverage) {
      excluded.push({
        start: reading.start,
        end: reading.end,
        index,
        reason: `weather covers ${covered} of ${days} days (${formatPercent(coverage)} < ${formatPercent(minCoverage)} required)`,
      });
      return;
    }
    periods.push({
      start: reading.start,
      end: reading.end,
      days,
      quantity: reading.quantity,
      usePerDay: reading.quantity / days,
      meanTemp: sum / covered,
      coverage,
      estimated: reading.estimated ?? false,
      dayTemps,
      ...(indexed.length > 0 ? { variables: periodVariables(indexed, first, days)! } : {}),
    });
  });
  return { periods, excluded };
}

/**
 * Daily temperatures indexed by day number once: many meters' readings at
 * one station are aligned without indexing its weather again for each. An
 * alignment reads only its periods' own days, so an index that holds more
 * days than they span aligns exactly as their own days would.
 */
export class DayIndexedWeather {
  readonly byDay: ReadonlyMap<number, number>;

  constructor(weather: readonly DailyTemperature[] | ReadonlyMap<string, number>) {
    this.byDay = indexByDayNumber(weather);
  }
}

/** Daily weather as the alignment takes it: a list, a map by date, or an index built once. */
export type DailyWeather = readonly DailyTemperature[] | ReadonlyMap<string, number> | DayIndexedWeather;

/** Daily temperatures keyed by day number, so a period's days are looked up without building date strings. */
function indexByDayNumber(weather: DailyWeather): ReadonlyMap<number, number> {
  if (weather instanceof DayIndexedWeather) return weather.byDay;
  const byDay = new Map<number, number>();
  const add = (date: string, temp: number) => {
    const day = parseIsoDate(date);
    if (day !== null) byDay.set(day, temp);
  };
  if (weather instanceof Map) for (const [date, temp] of weather as ReadonlyMap<string, number>) add(date, temp);
  else for (const day of weather as readonly DailyTemperature[]) add(day.date, day.temp);
  return byDay;
}

function formatPercent(fraction: number): string {
  return `${(fraction * 100).toFixed(fraction * 100 === Math.round(fraction * 100) ? 0 : 1)}%`;
}

/**
 * The days of `periods` that have no daily temperature, as merged date
 * ranges [start, end) in date order: what an error names when readings
 * cannot be used for want of weather.
 */
export function missingWeatherDates(
  periods: readonly { start: string; end: string }[],
  weather: DailyWeather,
): { start: string; end: string; days: number }[] {
  const byDay = indexByDayNumber(weather);
  const missing = new Set<number>();
  for (const period of periods) {
    const first = parseIsoDate(period.start);
    const end = parseIsoDate(period.end);
    if (first === null || end === null) continue;
    for (let d = first; d < end; d++) if (!byDay.has(d)) missing.add(d);
  }
  const days = [...missing].sort((a, b) => a - b);
  const ranges: { start: string; end: string; days: number }[] = [];
  for (let i = 0; i < days.length;) {
    let j = i;
    while (j + 1 < days.length && days[j + 1] === days[j]! + 1) j++;
    ranges.push({ start: formatDayNumber(days[i]!), end: formatDayNumber(days[j]! + 1), days: j - i + 1 });
    i = j + 1;
  }
  return ranges;
}

/** "2026-01-01..2026-02-01 (31 days), 2026-03-05..2026-03-06 (1 day)", at most `limit` ranges and how many more. */
export function describeDateRanges(ranges: readonly { start: string; end: string; days: number }[], limit = 5): string {
  const shown = ranges
    .slice(0, limit)
    .map((r) => `${r.start}..${r.end} (${r.days} day${r.days === 1 ? '' : 's'})`)
    .join(', ');
  return ranges.length > limit ? `${shown} and ${ranges.length - limit} more range(s)` : shown;
}
