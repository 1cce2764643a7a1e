/**
 * A normal year built from a station's own history: for each of the 365
 * days (MM-DD, 02-29 left out) the mean of that calendar day over the years
 * asked for, then smoothed by a centred moving mean of `windowDays` days
 * (15 by default: a choice of our own, wide enough to damp one year's
 * spells, narrow enough to keep the seasonal shape; it wraps around the
 * year's end). 29 February is folded into 28 February as one more sample of
 * that day, so a leap year weighs as any other. A calendar day with fewer
 * than `minYearShare` of the years (80% by default, our own) is refused.
 */
import { ShortHistoryError } from './errors.js';
import { NORMAL_YEAR_DAYS } from './normal-year.js';

export const DEFAULT_NORMAL_WINDOW_DAYS = 15;
export const DEFAULT_MIN_YEAR_SHARE = 0.8;

export interface HistoryOptions {
  fromYear: number;
  toYear: number;
  windowDays?: number;
  minYearShare?: number;
}

export interface HistoryNormalYear {
  /** The 365 smoothed means, in NORMAL_YEAR_DAYS order. */
  temps: number[];
  /** The unsmoothed calendar-day means. */
  rawMeans: number[];
  years: number;
  windowDays: number;
  /** Days of history that entered the means. */
  daysUsed: number;
}

const DAY_INDEX = new Map(NORMAL_YEAR_DAYS.map((day, i) => [day, i]));

/**
 * Throws ShortHistoryError naming the first calendar days short of history;
 * RangeError (misuse) for a window that is not an odd number of days from 1
 * to 61 or years that do not run forward.
 */
export function normalYearFromHistory(
  days: readonly { date: string; temp: number }[],
  options: HistoryOptions,
): HistoryNormalYear {
  const { fromYear, toYear } = options;
  const windowDays = options.windowDays ?? DEFAULT_NORMAL_WINDOW_DAYS;
  const minShare = options.minYearShare ?? DEFAULT_MIN_YEAR_SHARE;
  if (!(Number.isInteger(windowDays) && windowDays % 2 === 1 && windowDays >= 1 && windowDays <= 61)) {
    throw new RangeError(`windowDays must be an odd whole number from 1 to 61, got ${windowDays}`);
  }
  if (!(Number.isInteger(fromYear) && Number.isInteger(toYear) && toYear >= fromYear)) {
    throw new RangeError(`the years must run forward: ${fromYear}..${toYear}`);
  }
  const years = toYear - fromYear + 1;
  const sums = new Array<number>(365).fill(0);
  const counts = new Array<number>(365).fill(0);
  let daysUsed = 0;
  for (const day of days) {
    const year = Number(day.date.slice(0, 4));
    if (year < fromYear || year > toYear) continue;
    const monthDay = day.date.slice(5);
    const index = DAY_INDEX.get(monthDay === '02-29' ? '02-28' : monthDay);
    if (index === undefined) continue;
    sums[index]! += day.temp;
    counts[index]! += 1;
    daysUsed++;
  }
  const needed = Math.ceil(minShare * years);
  const short = NORMAL_YEAR_DAYS.filter((_, i) => counts[i]! < needed);
  if (short.length > 0) {
    throw new ShortHistoryError(short, needed, { from: fromYear, to: toYear });
  }
  const rawMeans = sums.map((sum, i) => sum / counts[i]!);
  const half = (windowDays - 1) / 2;
  const temps = rawMeans.map((_, i) => {
    let sum = 0;
    for (let k = -half; k <= half; k++) sum += rawMeans[(i + k + 365) % 365]!;
    return sum / windowDays;
  });
  return { temps, rawMeans, years, windowDays, daysUsed };
}
