/**
 * A facility calendar: the day types the engineer names (working, weekend,
 * holiday, break …), a weekly pattern (the day type of each weekday, Monday
 * first) and dated exceptions over [start, end) that override it (a term
 * break, a holiday). For the fit, the calendar becomes daily indicator
 * variables, one per day type but the first (the reference): a daily
 * reading's value is 1 on a day of that type, a bill's is the share of its
 * days of that type (the mean of the daily indicator over its days).
 *
 * The model this gives is the changepoint shape with day-type intercepts:
 * one shared set of changepoints and temperature slopes, and a shift of the
 * use per day for each day type against the reference (common practice for
 * daily whole-facility data; separate fits per day type would need each day
 * type to carry enough days across the whole temperature range, which
 * holidays and breaks rarely do). Each indicator must earn its place like
 * any variable.
 */
import { addDays, parseIsoDate } from './dates.js';
import type { VariableSeries } from './variables.js';

export const WEEKDAYS = ['monday', 'tuesday', 'wednesday', 'thursday', 'friday', 'saturday', 'sunday'] as const;

export interface CalendarException {
  start: string;
  end: string;
  dayType: string;
  note?: string;
}

export interface FacilityCalendar {
  /** The day types, the reference first (its days carry no indicator). */
  dayTypes: string[];
  /** The day type of each weekday, Monday first (7 entries). */
  weekly: string[];
  /** Dated exceptions over [start, end), never overlapping. */
  exceptions: CalendarException[];
}

/** The name of a day type's indicator variable. */
export function dayTypeVariable(dayType: string): string {
  return `day type: ${dayType}`;
}

/** What is wrong with a calendar, each naming its field (empty when nothing is). */
export function checkCalendar(calendar: FacilityCalendar): { field: string; message: string }[] {
  const problems: { field: string; message: string }[] = [];
  const types = new Set<string>();
  calendar.dayTypes.forEach((type, i) => {
    if (type.trim() === '') problems.push({ field: `dayTypes[${i}]`, message: 'must not be empty' });
    else if (types.has(type)) problems.push({ field: `dayTypes[${i}]`, message: `"${type}" is named twice` });
    types.add(type);
  });
  if (calendar.dayTypes.length === 0) problems.push({ field: 'dayTypes', message: 'name at least one day type' });
  if (calendar.weekly.length !== 7)
    problems.push({ field: 'weekly', message: `needs 7 day types, Monday first (got ${calendar.weekly.length})` });
  calendar.weekly.forEach((type, i) => {
    if (!types.has(type))
      problems.push({
        field: `weekly[${i}]`,
        message: `"${type}" is not one of dayTypes (${WEEKDAYS[i] ?? 'beyond Sunday'})`,
      });
  });
  calendar.exceptions.forEach((e, i) => {
    if (parseIsoDate(e.start) === null)
      problems.push({ field: `exceptions[${i}].start`, message: `not a calendar date: ${e.start}` });
    else if (parseIsoDate(e.end) === null || !(e.end > e.start))
      problems.push({ field: `exceptions[${i}].end`, message: `must be a calendar date after start (${e.start})` });
    if (!types.has(e.dayType))
      problems.push({ field: `exceptions[${i}].dayType`, message: `"${e.dayType}" is not one of dayTypes` });
  });
  if (problems.length === 0) {
    const order = calendar.exceptions
      .map((e, i) => ({ ...e, i }))
      .sort((a, b) => (a.start < b.start ? -1 : a.start > b.start ? 1 : a.i - b.i));
    for (let k = 1; k < order.length; k++) {
      const [a, b] = [order[k - 1]!, order[k]!];
      if (b.start < a.end) {
        problems.push({
          field: `exceptions[${b.i}]`,
          message: `${b.start}..${b.end} overlaps exceptions[${a.i}] ${a.start}..${a.end}`,
        });
      }
    }
  }
  return problems;
}

/**
 * The day type of each day in [from, to), in order.
 * @example dayTypesOver({ dayTypes: ['working', 'weekend'], weekly: ['working', 'working', 'working', 'working', 'working', 'weekend', 'weekend'], exceptions: [] }, '2024-01-06', '2024-01-09') // ["weekend","weekend","working"] — 2024-01-06 was a Saturday (source: by hand, from any printed calendar)
 */
export function dayTypesOver(calendar: FacilityCalendar, from: string, to: string): string[] {
  const first = parseIsoDate(from);
  const end = parseIsoDate(to);
  if (first === null || end === null) throw new RangeError(`not a date range: ${from}..${to}`);
  const out: string[] = [];
  const exceptions = [...calendar.exceptions].sort((a, b) => (a.start < b.start ? -1 : 1));
  let e = 0;
  for (let day = first; day < end; day++) {
    const date = addDays(from, day - first);
    while (e < exceptions.length && exceptions[e]!.end <= date) e++;
    const exception = exceptions[e];
    if (exception && exception.start <= date) out.push(exception.dayType);
    else out.push(calendar.weekly[(((day + 3) % 7) + 7) % 7]!); // day 0 (1970-01-01) was a Thursday: index 3, Monday first
  }
  return out;
}

/** Daily indicator series of every day type but the reference, over [from, to). */
export function dayTypeSeries(calendar: FacilityCalendar, from: string, to: string): VariableSeries[] {
  const types = dayTypesOver(calendar, from, to);
  return calendar.dayTypes.slice(1).map((dayType) => ({
    name: dayTypeVariable(dayType),
    aggregation: 'mean' as const,
    values: types.map((type, i) => ({
      start: addDays(from, i),
      end: addDays(from, i + 1),
      value: type === dayType ? 1 : 0,
    })),
  }));
}
