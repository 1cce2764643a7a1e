/**
 * Reporting length in calendar months, for the Guideline 14 CV(RMSE) limit
 * that depends on it. Each day counts as 1/(days of its calendar month), so
 * a whole calendar month is exactly 1, a calendar year (365 or 366 days) is
 * exactly 12, and a year from any date to the same date a year later is 12
 * as well; one day short of that is under 12. Counting days ÷ 30.44 instead
 * made a 365-day year 11.99 months and judged it by the under-12 limit.
 *
 * Days are grouped by the length of their month and divided once per
 * length, so whole months sum to whole numbers exactly (no rounding at the
 * 12-month boundary).
 */
import { daysInMonth, formatDayNumber, parseIsoDate } from './dates.js';

/** Calendar months covered by the periods [start, end) (periods must not overlap; each day counted once per period). */
export function calendarMonths(periods: readonly { start: string; end: string }[]): number {
  // days counted, by the length of their month (28, 29, 30, 31)
  const byLength = new Map<number, number>();
  for (const period of periods) {
    const first = parseIsoDate(period.start);
    const end = parseIsoDate(period.end);
    if (first === null || end === null)
      throw new RangeError(`not a period of ISO dates: ${period.start}..${period.end}`);
    let day: number = first;
    while (day < end) {
      const date = formatDayNumber(day);
      const year = Number(date.slice(0, 4));
      const month = Number(date.slice(5, 7));
      const length = daysInMonth(year, month);
      const nextMonth: number = day - (Number(date.slice(8, 10)) - 1) + length;
      const upTo: number = end < nextMonth ? end : nextMonth;
      byLength.set(length, (byLength.get(length) ?? 0) + (upTo - day));
      day = upTo;
    }
  }
  let months = 0;
  for (const [length, days] of [...byLength].sort((a, b) => a[0] - b[0])) months += days / length;
  return months;
}
