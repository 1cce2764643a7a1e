/**
 * ISO calendar dates (YYYY-MM-DD) as whole UTC days: no time zones, no
 * clocks. A date that does not exist (2025-02-30) is not a date.
 */
const ISO_DATE = /^(\d{4})-(\d{2})-(\d{2})$/;
const MS_PER_DAY = 86_400_000;

/** Day number since 1970-01-01 of a valid ISO date, or null. */
export function parseIsoDate(text: string): number | null {
  const match = ISO_DATE.exec(text);
  if (!match) return null;
  const [year, month, day] = [Number(match[1]), Number(match[2]), Number(match[3])];
  // setUTCFullYear, unlike Date.UTC, does not map years 0–99 to 1900–1999.
  const back = new Date(0);
  back.setUTCFullYear(year, month - 1, day);
  const ms = back.getTime();
  if (back.getUTCFullYear() !== year || back.getUTCMonth() !== month - 1 || back.getUTCDate() !== day) return null;
  return ms / MS_PER_DAY;
}

export function isIsoDate(text: string): boolean {
  return parseIsoDate(text) !== null;
}

function dayNumber(date: string): number {
  const value = parseIsoDate(date);
  if (value === null) throw new RangeError(`not an ISO date: ${JSON.stringify(date)}`);
  return value;
}

export function formatDayNumber(day: number): string {
  return new Date(day * MS_PER_DAY).toISOString().slice(0, 10);
}

/** end − start in days. */
export function daysBetween(start: string, end: string): number {
  return dayNumber(end) - dayNumber(start);
}

export function addDays(date: string, days: number): string {
  return formatDayNumber(dayNumber(date) + days);
}
