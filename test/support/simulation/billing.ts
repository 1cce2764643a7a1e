/**
 * How a meter is read: bills of 28–33 days on irregular read dates
 * (consecutive bills share the read date), or one reading a day. A reading
 * is the sum of the meter's daily use over its days [start, end).
 */
import { addDays, daysBetween } from '../../../src/engine/dates.js';
import type { Reading } from '../../../src/engine/types.js';
import type { Random } from '../../../src/lib/seeded-random.js';

export interface BillLengths {
  min: number;
  max: number;
}

/** Bills of 28 to 33 days, as a utility reads meters by hand. */
export const BILL_LENGTHS: BillLengths = { min: 28, max: 33 };

/** `bills` + 1 read dates from `start`, each bill 28–33 days (uniform whole days). */
export function billReadDates(
  start: string,
  bills: number,
  random: Random,
  lengths: BillLengths = BILL_LENGTHS,
): string[] {
  const dates = [start];
  let current = start;
  for (let i = 0; i < bills; i++) {
    current = addDays(current, random.integer(lengths.min, lengths.max));
    dates.push(current);
  }
  return dates;
}

/** `days` + 1 read dates one day apart: daily readings. */
export function dailyReadDates(start: string, days: number): string[] {
  return Array.from({ length: days + 1 }, (_, d) => addDays(start, d));
}

/**
 * Readings between consecutive read dates, each the sum of `dailyUse` over
 * its days; `dailyUse[0]` is the use on `firstDay`.
 */
export function readingsFromDailyUse(
  readDates: readonly string[],
  firstDay: string,
  dailyUse: readonly number[],
): Reading[] {
  const readings: Reading[] = [];
  for (let i = 0; i + 1 < readDates.length; i++) {
    const start = readDates[i]!;
    const end = readDates[i + 1]!;
    const from = daysBetween(firstDay, start);
    const to = daysBetween(firstDay, end);
    if (from < 0 || to > dailyUse.length) throw new RangeError(`no daily use for the reading ${start} to ${end}`);
    let quantity = 0;
    for (let d = from; d < to; d++) quantity += dailyUse[d]!;
    readings.push({ start, end, quantity });
  }
  return readings;
}
