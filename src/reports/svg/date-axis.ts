/**
 * A calendar axis: ticks on the first day of a month, every 1, 2, 3, 6 or 12
 * months so that about `target` ticks span the range. Labels are short month
 * names (our own English abbreviations, no locale), with the year on the
 * first tick and on every January.
 */
import { formatDayNumber, parseIsoDate } from '../../engine/dates.js';

export interface DateTick {
  /** Days since 1970-01-01. */
  day: number;
  /** e.g. "Jul 2025" or "Aug". */
  label: string;
}

const MONTHS = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'] as const;
/** Month steps, up to a millennium, so even the widest span of ISO dates (years 0000 to 9999) gets a handful of ticks. */
const MONTH_STEPS = [1, 2, 3, 6, 12, 24, 60, 120, 240, 600, 1200, 2400, 6000, 12000];
/** The most ticks a date axis gets, whatever its span. */
export const MAX_DATE_TICKS = 24;
/** Day numbers of 0000-01-01 and 9999-12-31, the range of ISO dates this project reads. */
const FIRST_DAY = -719_528;
const LAST_DAY = 2_932_896;

/** Day number of an ISO date, or null when it is not one. */
export function dayOf(date: string): number | null {
  return parseIsoDate(date);
}

/** A date as "5 Jul 2025" (day, month abbreviation, year); text that is not a date is returned as is. */
export function shortDate(date: string): string {
  const day = parseIsoDate(date);
  if (day === null) return date;
  const [year, month, dayOfMonth] = formatDayNumber(day).split('-').map(Number);
  return `${dayOfMonth} ${MONTHS[(month ?? 1) - 1]} ${year}`;
}

/**
 * Month-start ticks within [startDay, endDay], at most MAX_DATE_TICKS of
 * them, all inside the ISO date range (years 0000 to 9999).
 */
export function dateTicks(startDay: number, endDay: number, target = 7): DateTick[] {
  if (!Number.isFinite(startDay) || !Number.isFinite(endDay) || endDay <= startDay) return [];
  // Whole days inside both the span and the ISO date range; none when they do not meet.
  const first = Math.max(Math.ceil(startDay), FIRST_DAY);
  const last = Math.min(Math.floor(endDay), LAST_DAY);
  if (last < first) return [];
  const wanted = Number.isFinite(target) ? Math.min(Math.max(Math.round(target), 2), MAX_DATE_TICKS) : 7;
  const [firstYear, firstMonth] = formatDayNumber(first).split('-').map(Number) as [number, number];
  const months = Math.ceil((last - first) / 30.44) + 1;
  const step = MONTH_STEPS.find((s) => months / s <= wanted) ?? MONTH_STEPS[MONTH_STEPS.length - 1]!;
  const ticks: DateTick[] = [];
  // Start from the first month start at or after startDay, aligned to the step within the year.
  let index = firstYear * 12 + (firstMonth - 1);
  if (formatDayNumber(first).slice(8) !== '01') index += 1;
  while (index % step !== 0) index += 1;
  for (; ticks.length < MAX_DATE_TICKS; index += step) {
    const year = Math.floor(index / 12);
    const month = (index % 12) + 1;
    const day = parseIsoDate(`${String(year).padStart(4, '0')}-${String(month).padStart(2, '0')}-01`);
    if (day === null || day > last) break;
    const withYear = ticks.length === 0 || month === 1;
    ticks.push({ day, label: withYear ? `${MONTHS[month - 1]} ${String(year).padStart(4, '0')}` : MONTHS[month - 1]! });
  }
  return ticks;
}
