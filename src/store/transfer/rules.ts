/**
 * The ledger's rules on the rows of an export document, the same the API
 * checks on the way in (column types and references are checked by
 * transfer.ts): an import stores nothing the API would have refused.
 * Readings: dates, end after start, quantities within bounds, no overlaps
 * per meter. Adjustments: exactly one of quantity and perDay, within bounds,
 * end after start. Rates: one schedule per meter without gaps or overlaps,
 * prices within bounds.
 */
import {
  checkAdjustment,
  checkRateBounds,
  checkReadings,
  checkRateSchedule,
  type InputProblem,
  type RateEntry,
  type Reading,
  addDays,
  parseIsoDate,
} from '../../engine/index.js';
import { MAX_VARIABLE_MAGNITUDE } from '../../domain/limits.js';

type Cell = string | number | null;
type Row = Record<string, Cell>;

/** The first rule a row breaks, as `path: message`, or null when every row keeps them. */
export function firstRuleBroken(tables: {
  readings: readonly Row[];
  adjustments: readonly Row[];
  rates: readonly Row[];
  variables?: readonly Row[];
  variable_values?: readonly Row[];
}): string | null {
  const valueProblem = firstVariableValueBroken(tables.variables ?? [], tables.variable_values ?? []);
  if (valueProblem) return valueProblem;
  for (const [index, row] of tables.adjustments.entries()) {
    const error = checkAdjustment({
      id: String(row.id),
      start: String(row.period_start),
      end: String(row.period_end),
      quantity: row.quantity as number | null,
      perDay: row.per_day as number | null,
      reason: String(row.reason),
      uncertainty: row.uncertainty as number | null,
    });
    if (error) return `tables.adjustments[${index}].${COLUMN_OF[error.field]}: ${error.reason}`;
  }
  const readings = perMeter(tables.readings, (row): Reading => ({
    start: String(row.period_start),
    end: String(row.period_end),
    quantity: row.quantity as number,
  }));
  const readingProblem = firstProblem('readings', readings, checkReadings, {
    start: 'period_start',
    end: 'period_end',
  });
  if (readingProblem) return readingProblem;
  const rates = perMeter(tables.rates, (row) => ({
    from: String(row.effective_from),
    to: row.effective_to as string | null,
    price: row.price as number,
    escalation: row.escalation as number,
  }));
  return firstProblem(
    'rates',
    rates,
    (entries: RateEntry[]) => [...checkRateSchedule(entries), ...checkRateBounds(entries)],
    {
      from: 'effective_from',
      to: 'effective_to',
    },
  );
}

const COLUMN_OF = {
  quantity: 'quantity',
  perDay: 'per_day',
  uncertainty: 'uncertainty',
  start: 'period_start',
  end: 'period_end',
} as const;

/** Rows grouped by meter, each with its index in the table. */
function perMeter<T>(rows: readonly Row[], convert: (row: Row) => T): Map<Cell, { items: T[]; indexes: number[] }> {
  const groups = new Map<Cell, { items: T[]; indexes: number[] }>();
  rows.forEach((row, index) => {
    const group = groups.get(row.meter_id!) ?? { items: [], indexes: [] };
    group.items.push(convert(row));
    group.indexes.push(index);
    groups.set(row.meter_id!, group);
  });
  return groups;
}

function firstProblem<T>(
  table: string,
  groups: Map<Cell, { items: T[]; indexes: number[] }>,
  check: (items: T[]) => InputProblem[],
  columns: Record<string, string>,
): string | null {
  for (const { items, indexes } of groups.values()) {
    const problem = check(items).sort((a, b) => a.index - b.index)[0];
    if (problem)
      return `tables.${table}[${indexes[problem.index]}].${columns[problem.field] ?? problem.field}: ${problem.message}`;
  }
  return null;
}

/**
 * A variable's values as the API takes them: real dates with end after
 * start, one day each for a daily variable, finite and within the bound,
 * no two periods of one variable overlapping.
 */
function firstVariableValueBroken(variables: readonly Row[], values: readonly Row[]): string | null {
  const kinds = new Map(variables.map((row) => [row.id, row.kind]));
  const lastEnd = new Map<Cell, string>();
  const order = values
    .map((row, index) => ({ row, index }))
    .sort((a, b) => (String(a.row.period_start) < String(b.row.period_start) ? -1 : 1));
  for (const { row, index } of order) {
    const path = `tables.variable_values[${index}]`;
    const start = String(row.period_start);
    const end = String(row.period_end);
    if (parseIsoDate(start) === null) return `${path}.period_start: not a calendar date: ${start}`;
    if (parseIsoDate(end) === null || !(end > start))
      return `${path}.period_end: must be a calendar date after period_start (${start})`;
    if (kinds.get(row.variable_id!) === 'daily' && addDays(start, 1) !== end)
      return `${path}.period_end: a daily variable's value covers one day`;
    const value = row.value as number;
    if (!Number.isFinite(value) || Math.abs(value) > MAX_VARIABLE_MAGNITUDE)
      return `${path}.value: not a finite number within ±${MAX_VARIABLE_MAGNITUDE}`;
    const previous = lastEnd.get(row.variable_id!);
    if (previous !== undefined && start < previous)
      return `${path}.period_start: overlaps another value of variable ${row.variable_id}`;
    lastEnd.set(row.variable_id!, end);
  }
  return null;
}
