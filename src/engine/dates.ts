/**
 * ISO calendar dates (YYYY-MM-DD) as whole UTC days: no time zones, no
 * clocks. A date that does not exist (2025-02-30) is not a date.
 */
const MS_PER_DAY = 86_400_000;

/** Day number since 1970-01-01 of a valid ISO date, or null. */
export function parseIsoDate(text: string): number | null {
  // Read the ten characters directly (this runs once per day of weather on
  // every savings request; a regular expression costs more than the rest).
  if (text.length !== 10 || text.charCodeAt(4) !== 45 || text.charCodeAt(7) !== 45) return null;
  const year = digits(text, 0, 4);
  const month = digits(text, 5, 7);
  const day = digits(text, 8, 10);
  if (year < 0 || month < 1 || month > 12 || day < 1 || day > daysInMonth(year, month)) return null;
  return daysFromCivil(year, month, day);
}

/** The decimal number in text[from, to), or −1 if any character is not a digit. */
function digits(text: string, from: number, to: number): number {
  let value = 0;
  for (let i = from; i < to; i++) {
    const code = text.charCodeAt(i) - 48;
    if (code < 0 || code > 9) return -1;
    value = value * 10 + code;
  }
  return value;
}

function isLeapYear(year: number): boolean {
  return (year % 4 === 0 && year % 100 !== 0) || year % 400 === 0;
}

/** Days in a month of the proleptic Gregorian calendar (month 1–12). */
export function daysInMonth(year: number, month: number): number {
  return month === 2 ? (isLeapYear(year) ? 29 : 28) : [31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31][month - 1]!;
}

/**
 * Days since 1970-01-01 in the proleptic Gregorian calendar, by plain integer
 * arithmetic (the era algorithm of H. Hinnant, "chrono-compatible low-level
 * date algorithms"): no Date objects on the hot path of bulk ingestion.
 */
function daysFromCivil(year: number, month: number, day: number): number {
  const y = month <= 2 ? year - 1 : year;
  const era = Math.floor(y / 400);
  const yearOfEra = y - era * 400;
  const dayOfYear = Math.floor((153 * (month + (month > 2 ? -3 : 9)) + 2) / 5) + day - 1;
  const dayOfEra = yearOfEra * 365 + Math.floor(yearOfEra / 4) - Math.floor(yearOfEra / 100) + dayOfYear;
  return era * 146097 + dayOfEra - 719468;
}

export function isIsoDate(text: string): boolean {
  return parseIsoDate(text) !== null;
}

/** The whole UTC day number of an ISO date; RangeError for a text that is not one (the caller promised a checked date). */
export function dayNumber(date: string): number {
  const value = parseIsoDate(date);
  if (value === null) throw new RangeError(`not an ISO date: ${JSON.stringify(date)}`);
  return value;
}

/** 1000-01-01 and 9999-12-31: the years whose text is four digits without padding. */
const FIRST_FAST_DAY = daysFromCivil(1000, 1, 1);
const LAST_FAST_DAY = daysFromCivil(9999, 12, 31);
/** "00" to "31": the two-digit month and day texts, built once. */
const TWO_DIGITS = Array.from({ length: 32 }, (_, n) => (n < 10 ? `0${n}` : String(n)));

/**
 * The ISO date of a day number. Whole days in years 1000–9999 by integer
 * arithmetic (the inverse of daysFromCivil, same source): no Date object and
 * no ISO string to cut, since this runs for every day of weather a fit or a
 * savings request walks. Anything else through Date, as before (it throws a
 * RangeError where there is no such date).
 */
export function formatDayNumber(day: number): string {
  if (Number.isInteger(day) && day >= FIRST_FAST_DAY && day <= LAST_FAST_DAY) {
    const z = day + 719468;
    const era = Math.floor(z / 146097);
    const dayOfEra = z - era * 146097;
    const yearOfEra = Math.floor(
      (dayOfEra - Math.floor(dayOfEra / 1460) + Math.floor(dayOfEra / 36524) - Math.floor(dayOfEra / 146096)) / 365,
    );
    const dayOfYear = dayOfEra - (365 * yearOfEra + Math.floor(yearOfEra / 4) - Math.floor(yearOfEra / 100));
    const shiftedMonth = Math.floor((5 * dayOfYear + 2) / 153);
    const dayOfMonth = dayOfYear - Math.floor((153 * shiftedMonth + 2) / 5) + 1;
    const month = shiftedMonth < 10 ? shiftedMonth + 3 : shiftedMonth - 9;
    const year = yearOfEra + era * 400 + (month <= 2 ? 1 : 0);
    return `${year}-${TWO_DIGITS[month]}-${TWO_DIGITS[dayOfMonth]}`;
  }
  return new Date(day * MS_PER_DAY).toISOString().slice(0, 10);
}

/** end − start in days. */
export function daysBetween(start: string, end: string): number {
  return dayNumber(end) - dayNumber(start);
}

export function addDays(date: string, days: number): string {
  return formatDayNumber(dayNumber(date) + days);
}
