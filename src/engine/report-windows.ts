/**
 * Reporting windows: calendar quarters, contract years, and the rule that
 * puts each reading in exactly one window. Windows are [from, to) like
 * readings: ISO dates, `to` exclusive.
 */
import { addDays, daysBetween, isIsoDate, dayNumber } from './dates.js';

/** A span of days [from, to): ISO dates, `to` exclusive. */
export interface DateWindow {
  from: string;
  to: string;
}

/**
 * `date` moved by a whole number of calendar years (negative moves back).
 * A Feb 29 that lands in a year without one becomes Mar 1 of that year:
 * the anniversary falls on the first day that has fully reached it. Always
 * count from the original date (addYears(d, 2), not addYears(addYears(d, 1), 1)),
 * so a Feb 29 start comes back to Feb 29 in later leap years. Rate
 * escalation (rates.ts) counts its anniversaries with this same function.
 * Throws RangeError for a date that is not ISO, a non-integer count, or a
 * result outside the years 0000–9999.
 */
export function addYears(date: string, years: number): string {
  if (!isIsoDate(date)) throw new RangeError(`not an ISO date: ${JSON.stringify(date)}`);
  if (!Number.isInteger(years)) throw new RangeError(`years must be a whole number, got ${years}`);
  const year = Number(date.slice(0, 4)) + years;
  if (year < 0 || year > 9999) throw new RangeError(`${date} + ${years} years leaves the years 0000–9999`);
  const monthDay = date.slice(5);
  const moved = `${String(year).padStart(4, '0')}-${monthDay}`;
  // Only Feb 29 can fail to exist in the target year.
  return isIsoDate(moved) ? moved : `${String(year).padStart(4, '0')}-03-01`;
}

/**
 * Whole calendar years from `from` to `date` (date ≥ from): the largest k
 * with addYears(from, k) ≤ date. From 2024-03-01, k = 1 from 2025-03-01.
 */
export function wholeYearsBetween(from: string, date: string): number {
  const target = dayNumber(date);
  let k = Number(date.slice(0, 4)) - Number(from.slice(0, 4));
  // The year difference is right or one too many (the anniversary not yet reached).
  if (dayNumber(addYears(from, k)) > target) k -= 1;
  return k;
}

const QUARTER_PATTERN = /^\d{4}-Q[1-4]$/;

/**
 * The calendar quarter named by text like '2026-Q3' → [2026-07-01, 2026-10-01).
 * Throws RangeError for any other text.
 */
export function quarterWindow(text: string): DateWindow {
  if (!QUARTER_PATTERN.test(text)) {
    throw new RangeError(`not a quarter: ${JSON.stringify(text)} (expected YYYY-Qn with n from 1 to 4, e.g. 2026-Q3)`);
  }
  const year = text.slice(0, 4);
  const quarter = Number(text.slice(6));
  const from = `${year}-${String(3 * quarter - 2).padStart(2, '0')}-01`;
  if (quarter < 4) return { from, to: `${year}-${String(3 * quarter + 1).padStart(2, '0')}-01` };
  if (year === '9999') throw new RangeError(`the quarter ${text} ends after the year 9999`);
  return { from, to: `${String(Number(year) + 1).padStart(4, '0')}-01-01` };
}

/**
 * Contract year N (1-based) of a contract of `years` years starting on
 * `contractStart`: [start + (N−1) years, start + N years), by addYears.
 * Throws RangeError when N is not a whole number from 1 to `years`.
 */
export function contractYearWindow(contractStart: string, years: number, year: number): DateWindow {
  checkContract(contractStart, years);
  if (!Number.isInteger(year) || year < 1 || year > years) {
    throw new RangeError(`contract year must be a whole number from 1 to ${years}, got ${year}`);
  }
  return { from: addYears(contractStart, year - 1), to: addYears(contractStart, year) };
}

/**
 * The contract year numbers (ascending) whose windows share at least one
 * day with `window`. Throws RangeError for a bad contract or a window whose
 * `to` is not after its `from`.
 */
export function contractYearsOverlapping(contractStart: string, years: number, window: DateWindow): number[] {
  checkContract(contractStart, years);
  const from = dayNumber(window.from);
  const to = dayNumber(window.to);
  if (to <= from) throw new RangeError(`window ${window.from}..${window.to} is empty (to must be after from)`);
  const overlapping: number[] = [];
  for (let n = 1; n <= years; n++) {
    const year = contractYearWindow(contractStart, years, n);
    const yearFrom = dayNumber(year.from);
    if (yearFrom >= to) break; // later years start later still
    if (dayNumber(year.to) > from) overlapping.push(n);
  }
  return overlapping;
}

/**
 * The day a reading [start, end) is filed under: start + floor(days / 2).
 * Of an odd-length reading this is its middle day; of an even-length one
 * it is the first day of its second half. Throws RangeError when end ≤ start.
 */
export function readingMidpoint(start: string, end: string): string {
  const days = daysBetween(start, end);
  if (days <= 0) throw new RangeError(`reading ${start}..${end} has no days (end must be after start)`);
  return addDays(start, Math.floor(days / 2));
}

/**
 * Whether a reading belongs to `window`: our rule is that a reading belongs
 * to the one window holding its midpoint (readingMidpoint). Windows that
 * tile the calendar (quarters, contract years) therefore each get every
 * reading exactly once, and monthly bills read on the 2nd–4th of the month
 * fall in the quarter that holds nearly all their days. It follows the
 * common practice of assigning a bill to the period holding most of its
 * days: a reading shorter than the window has at least half its days in the
 * window holding its midpoint (an exact half-and-half split goes to the later window).
 */
export function inWindowByMidpoint(reading: { start: string; end: string }, window: DateWindow): boolean {
  const mid = dayNumber(readingMidpoint(reading.start, reading.end));
  return mid >= dayNumber(window.from) && mid < dayNumber(window.to);
}

function checkContract(contractStart: string, years: number): void {
  if (!isIsoDate(contractStart))
    throw new RangeError(`contract start is not an ISO date: ${JSON.stringify(contractStart)}`);
  if (!Number.isInteger(years) || years < 1)
    throw new RangeError(`contract length must be a whole number of years ≥ 1, got ${years}`);
}
