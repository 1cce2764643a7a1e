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
} from '../../engine/index.js';

type Cell = string | number | null;
type Row = Record<string, Cell>;

/** The first rule a row breaks, as `path: message`, or null when every row keeps them. */
export function firstRuleBroken(tables: { readings: readonly Row[]; adjustments: readonly Row[]; rates: readonly Row[] }): string | null {
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
  const readingProblem = firstProblem('readings', readings, checkReadings, { start: 'period_start', end: 'period_end' });
  if (readingProblem) return readingProblem;
  const rates = perMeter(tables.rates, (row) => ({
    from: String(row.effective_from),
    to: row.effective_to as string | null,
    price: row.price as number,
    escalation: row.escalation as number,
  }));
  return firstProblem('rates', rates, (entries: RateEntry[]) => [...checkRateSchedule(entries), ...checkRateBounds(entries)], {
    from: 'effective_from',
    to: 'effective_to',
  });
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
    if (problem) return `tables.${table}[${indexes[problem.index]}].${columns[problem.field] ?? problem.field}: ${problem.message}`;
  }
  return null;
}
