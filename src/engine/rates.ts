/**
 * Contract rates: the price per unit of energy that turns avoided energy
 * into avoided cost, effective-dated and escalating yearly. A schedule is a
 * list of entries in ascending order, each applying on [from, to), with no
 * gaps and no overlaps between them; only the last may be open-ended.
 */
import { parseIsoDate, formatDayNumber, dayNumber } from './dates.js';
import type { InputProblem } from './input-problem.js';
import { addYears, wholeYearsBetween } from './report-windows.js';
import { ESCALATION } from './bounds.js';

/**
 * One effective-dated rate. It applies on [from, to); `to` null means
 * open-ended. `escalation` is a yearly fraction (0.03 = 3% a year): on day d
 * the rate is price × (1 + escalation)^k, k the whole calendar years from
 * `from` to d (from 2024-03-01, k = 1 from 2025-03-01). An entry starting
 * on Feb 29 has its anniversary on Mar 1 in years without a Feb 29, and on
 * Feb 29 in leap years (see addYears in report-windows.ts).
 */
export interface RateEntry {
  from: string;
  to: string | null;
  price: number;
  escalation: number;
}

/**
 * Problems in a rate schedule, each naming the entry (its index) and the
 * field. Refused: bad dates; from ≥ to; a price that is not a finite number
 * ≥ 0; an escalation that is not finite, ≤ −1 (the rate would vanish or
 * change sign) or > 1 (more than doubling a year, taken as a typing error);
 * entries out of ascending `from` order; overlaps; gaps between consecutive
 * entries; an open-ended entry that is not the last. An empty schedule is
 * allowed: it simply prices nothing.
 */
export function checkRateSchedule(entries: readonly RateEntry[]): InputProblem[] {
  const problems: InputProblem[] = [];
  // The entry reaching furthest so far: a long entry is compared with every
  // later one, not only the next (Infinity = open-ended).
  let reach: { index: number; from: number; to: number } | undefined;
  let previousFrom: number | undefined;
  entries.forEach((entry, index) => {
    const from = parseIsoDate(entry.from);
    const to = entry.to === null ? Number.POSITIVE_INFINITY : parseIsoDate(entry.to);
    if (from === null)
      problems.push({ index, field: 'from', message: `not a valid date (YYYY-MM-DD): ${JSON.stringify(entry.from)}` });
    if (to === null)
      problems.push({
        index,
        field: 'to',
        message: `not a valid date (YYYY-MM-DD) or null: ${JSON.stringify(entry.to)}`,
      });
    if (!Number.isFinite(entry.price)) problems.push({ index, field: 'price', message: 'not a finite number' });
    else if (entry.price < 0) problems.push({ index, field: 'price', message: `negative (${entry.price})` });
    if (!Number.isFinite(entry.escalation))
      problems.push({ index, field: 'escalation', message: 'not a finite number' });
    else if (entry.escalation <= ESCALATION.min || entry.escalation > ESCALATION.max) {
      problems.push({
        index,
        field: 'escalation',
        message: `${entry.escalation} is outside the allowed range (${ESCALATION.min}, ${ESCALATION.max}] of yearly fractions (0.03 = 3% a year)`,
      });
    }
    if (entry.to === null && index < entries.length - 1) {
      problems.push({
        index,
        field: 'to',
        message: 'an open-ended entry (to = null) must be the last in the schedule',
      });
    }
    if (from === null || to === null) return;
    if (to <= from) {
      problems.push({ index, field: 'to', message: `to ${entry.to} is not after from ${entry.from}` });
      return;
    }
    if (previousFrom !== undefined && from < previousFrom) {
      problems.push({
        index,
        field: 'from',
        message: `from ${entry.from} is before the previous entry's from ${formatDayNumber(previousFrom)}: entries must be in ascending order of from`,
      });
      previousFrom = from;
      return;
    }
    previousFrom = from;
    if (reach) {
      const earlier = entries[reach.index]!;
      if (from < reach.to) {
        problems.push({
          index,
          field: 'from',
          message: `overlaps entry ${reach.index} (${earlier.from}..${earlier.to ?? 'open-ended'})`,
          relatedIndex: reach.index,
        });
      } else if (from > reach.to) {
        problems.push({
          index,
          field: 'from',
          message: `gap: no rate from ${earlier.to} to ${entry.from} between entries ${reach.index} and ${index}`,
          relatedIndex: reach.index,
        });
      }
    }
    if (!reach || to > reach.to) reach = { index, from, to };
  });
  return problems;
}

/**
 * The rate on `date`, or undefined when no entry covers it. Throws
 * RangeError for a date that is not ISO, or a schedule that
 * checkRateSchedule refuses (money is never priced from a schedule that has
 * to be guessed at).
 */
export function rateOn(schedule: readonly RateEntry[], date: string): number | undefined {
  const day = dayNumber(date);
  requireValid(schedule);
  const index = lastStartingOnOrBefore(schedule, day);
  if (index < 0) return undefined;
  const entry = schedule[index]!;
  if (entry.to !== null && day >= dayNumber(entry.to)) return undefined;
  return escalatedRate(entry, wholeYearsBetween(entry.from, date));
}

/**
 * The day-weighted mean rate over [start, end): Σ over days of the day's
 * rate / days. When any day has no rate, `rate` is null and `missing` lists
 * the maximal uncovered ranges [start, end), in date order. Works piece by
 * piece (one piece per entry and anniversary), so the cost grows with the
 * entries and years the period touches, not its days. Throws RangeError for
 * bad dates, end ≤ start, or a schedule that checkRateSchedule refuses.
 */
export function periodRate(
  schedule: readonly RateEntry[],
  start: string,
  end: string,
): { rate: number | null; missing: { start: string; end: string }[] } {
  const first = dayNumber(start);
  const last = dayNumber(end);
  if (last <= first) throw new RangeError(`period ${start}..${end} has no days (end must be after start)`);
  requireValid(schedule);

  const missing: { start: string; end: string }[] = [];
  let cost = 0; // Σ rate × days
  let cursor = first; // first day not yet accounted for
  for (let i = Math.max(lastStartingOnOrBefore(schedule, first), 0); i < schedule.length && cursor < last; i++) {
    const entry = schedule[i]!;
    const entryFrom = dayNumber(entry.from);
    const entryTo = entry.to === null ? Number.POSITIVE_INFINITY : dayNumber(entry.to);
    if (entryTo <= cursor) continue;
    if (entryFrom >= last) break;
    const pieceStart = Math.max(entryFrom, cursor);
    if (pieceStart > cursor) missing.push({ start: formatDayNumber(cursor), end: formatDayNumber(pieceStart) });
    const pieceEnd = Math.min(entryTo, last);
    // Split at each anniversary: the rate is constant between them.
    let k = wholeYearsBetween(entry.from, formatDayNumber(pieceStart));
    let from = pieceStart;
    while (from < pieceEnd) {
      const to = Math.min(dayNumber(addYears(entry.from, k + 1)), pieceEnd);
      cost += escalatedRate(entry, k) * (to - from);
      from = to;
      k += 1;
    }
    cursor = pieceEnd;
  }
  if (cursor < last) missing.push({ start: formatDayNumber(cursor), end });
  return missing.length > 0 ? { rate: null, missing } : { rate: cost / (last - first), missing };
}

function escalatedRate(entry: RateEntry, years: number): number {
  return entry.price * Math.pow(1 + entry.escalation, years);
}

/** Index of the last entry with from ≤ day (binary search; −1 if none). The schedule is sorted. */
function lastStartingOnOrBefore(schedule: readonly RateEntry[], day: number): number {
  let low = 0;
  let high = schedule.length - 1;
  let found = -1;
  while (low <= high) {
    const mid = (low + high) >> 1;
    if (dayNumber(schedule[mid]!.from) <= day) {
      found = mid;
      low = mid + 1;
    } else {
      high = mid - 1;
    }
  }
  return found;
}

function requireValid(schedule: readonly RateEntry[]): void {
  const problem = checkRateSchedule(schedule)[0];
  if (problem)
    throw new RangeError(`invalid rate schedule: entry ${problem.index} ${problem.field}: ${problem.message}`);
}
