/**
 * Independent variables as the model sees them. A variable is a named
 * series the engineer posts beside the readings: daily values (occupied
 * 0/1, people, production units) or values over periods that need not match
 * the bills. Each value becomes a value per day on each of its days:
 * - aggregation 'mean': a level (an occupancy share, a head count) holds on
 *   every day of its period as it is;
 * - aggregation 'total': an amount (units produced) is spread evenly over its
 *   period's days.
 * A reading's value is then the mean of the per-day values over its days, so
 * its coefficient reads "use per day per unit per day", the same for bills
 * and daily readings (common practice for the regression of use per day).
 * A reading with any day uncovered gets no value: it is never assumed.
 */
import { parseIsoDate } from './dates.js';

/** 'daily': one value per day; 'per-period': values over [start, end) periods. */
export type VariableKind = 'daily' | 'per-period';
/** How a value turns into values per day: 'mean' holds on each day, 'total' is spread evenly over its days. */
export type VariableAggregation = 'mean' | 'total';

export const VARIABLE_KINDS: readonly VariableKind[] = ['daily', 'per-period'];
export const VARIABLE_AGGREGATIONS: readonly VariableAggregation[] = ['mean', 'total'];

/** One stored value over [start, end) (a daily value: end = start + 1 day). */
export interface VariableValue {
  start: string;
  end: string;
  value: number;
}

/** A variable's name, how its values aggregate, and its values. */
export interface VariableSeries {
  name: string;
  aggregation: VariableAggregation;
  values: readonly VariableValue[];
}

/**
 * The series' value per day, by day number. Throws RangeError for a value
 * over an empty or impossible period (callers check their input first).
 * @example valuesPerDay({ name: 'units', aggregation: 'total', values: [{ start: '2024-01-01', end: '2024-01-05', value: 8 }] }).get(19723) // 2 — 8 units over 4 days, spread evenly (source: by hand; 19723 is 2024-01-01's day number since 1970-01-01)
 */
export function valuesPerDay(series: VariableSeries): Map<number, number> {
  const perDay = new Map<number, number>();
  for (const entry of series.values) {
    const first = parseIsoDate(entry.start);
    const end = parseIsoDate(entry.end);
    if (first === null || end === null || end <= first) {
      throw new RangeError(`variable "${series.name}": a value needs start < end, got ${entry.start}..${entry.end}`);
    }
    const value = series.aggregation === 'total' ? entry.value / (end - first) : entry.value;
    for (let day = first; day < end; day++) perDay.set(day, value);
  }
  return perDay;
}

/**
 * Mean of the per-day values over [first, first + days), or undefined when a
 * day has none.
 * @example meanOverDays(new Map([[10, 1], [11, 0], [12, 1]]), 10, 3) // 0.666… — two occupied days of three (source: by hand)
 */
export function meanOverDays(perDay: ReadonlyMap<number, number>, first: number, days: number): number | undefined {
  let sum = 0;
  for (let day = first; day < first + days; day++) {
    const value = perDay.get(day);
    if (value === undefined) return undefined;
    sum += value;
  }
  return sum / days;
}

/** Per-day values of several series, indexed once, to be looked up per period. */
export type IndexedVariables = readonly { name: string; perDay: ReadonlyMap<number, number> }[];

export function indexVariables(series: readonly VariableSeries[]): IndexedVariables {
  const names = new Set<string>();
  for (const s of series) {
    if (names.has(s.name)) throw new RangeError(`the variable "${s.name}" is given twice`);
    names.add(s.name);
  }
  return series.map((s) => ({ name: s.name, perDay: valuesPerDay(s) }));
}

/** A period's values of the indexed variables (those with every day covered), or undefined when none is given. */
export function periodVariables(
  indexed: IndexedVariables,
  first: number,
  days: number,
): Record<string, number> | undefined {
  if (indexed.length === 0) return undefined;
  const values: Record<string, number> = {};
  for (const { name, perDay } of indexed) {
    const mean = meanOverDays(perDay, first, days);
    if (mean !== undefined) values[name] = mean;
  }
  return values;
}
