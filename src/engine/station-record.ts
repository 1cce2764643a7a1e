/**
 * A station's daily record at a glance, so the engineer sees whether it is
 * fit to fit a baseline on: the span it covers, per calendar year the days
 * observed, filled and missing, the extremes, and the days outside the
 * plausible range of units.ts.
 */
import { daysBetween, addDays } from './dates.js';
import type { TemperatureUnit } from './types.js';
import { isPlausibleTemperature } from './units.js';
import type { FillMethod } from './weather-gaps.js';

export interface RecordDay {
  date: string;
  temp: number;
  /** How the day was filled; null or absent when observed. */
  filled?: FillMethod | null;
}

export interface RecordYear {
  year: number;
  /** Calendar days of the year inside the record's span. */
  days: number;
  observed: number;
  filled: number;
  missing: number;
}

export interface StationRecordSummary {
  first: string | null;
  last: string | null;
  /** Days from the first to the last day, both included. */
  spanDays: number;
  /** spanDays / 365.25. */
  yearsCovered: number;
  observed: number;
  filled: { interpolation: number; secondStation: number };
  missing: number;
  /** Shares of spanDays. */
  shareMissing: number;
  shareFilled: number;
  min: { date: string; temp: number } | null;
  max: { date: string; temp: number } | null;
  /** Days outside the plausible range (−80…140 °F in the station's unit). */
  outsideBounds: number;
  years: RecordYear[];
}

/** Summarise days (any order, each date once). */
export function summariseStationRecord(days: readonly RecordDay[], unit: TemperatureUnit): StationRecordSummary {
  const sorted = [...days].sort((a, b) => (a.date < b.date ? -1 : a.date > b.date ? 1 : 0));
  const first = sorted[0]?.date ?? null;
  const last = sorted.at(-1)?.date ?? null;
  const spanDays = first && last ? daysBetween(first, last) + 1 : 0;
  const filled = { interpolation: 0, secondStation: 0 };
  let observed = 0;
  let outsideBounds = 0;
  let min: StationRecordSummary['min'] = null;
  let max: StationRecordSummary['max'] = null;
  const years = new Map<number, RecordYear>();
  for (const day of sorted) {
    const year = yearEntry(years, Number(day.date.slice(0, 4)), first!, last!);
    if (day.filled === 'interpolation') filled.interpolation++;
    else if (day.filled === 'second-station') filled.secondStation++;
    else observed++;
    if (day.filled) year.filled++;
    else year.observed++;
    if (!isPlausibleTemperature(day.temp, unit)) outsideBounds++;
    if (!min || day.temp < min.temp) min = { date: day.date, temp: day.temp };
    if (!max || day.temp > max.temp) max = { date: day.date, temp: day.temp };
  }
  if (first && last)
    for (let y = Number(first.slice(0, 4)); y <= Number(last.slice(0, 4)); y++) yearEntry(years, y, first, last);
  const yearList = [...years.values()].sort((a, b) => a.year - b.year);
  for (const year of yearList) year.missing = year.days - year.observed - year.filled;
  const missing = spanDays - sorted.length;
  const filledCount = filled.interpolation + filled.secondStation;
  return {
    first,
    last,
    spanDays,
    yearsCovered: spanDays / 365.25,
    observed,
    filled,
    missing,
    shareMissing: spanDays > 0 ? missing / spanDays : 0,
    shareFilled: spanDays > 0 ? filledCount / spanDays : 0,
    min,
    max,
    outsideBounds,
    years: yearList,
  };
}

function yearEntry(years: Map<number, RecordYear>, year: number, first: string, last: string): RecordYear {
  let entry = years.get(year);
  if (!entry) {
    const start = `${year}-01-01` < first ? first : `${year}-01-01`;
    const endInclusive = `${year}-12-31` > last ? last : `${year}-12-31`;
    entry = { year, days: daysBetween(start, addDays(endInclusive, 1)), observed: 0, filled: 0, missing: 0 };
    years.set(year, entry);
  }
  return entry;
}
