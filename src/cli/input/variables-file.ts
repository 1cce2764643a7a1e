/**
 * Independent variables from CSV: a `date` column (daily values) or `start`
 * and `end` columns (values over [start, end)), then one column per
 * variable. A column's values are levels holding on each day (aggregation
 * mean) unless its header ends in `:total` (amounts spread over their days,
 * e.g. `units:total`). An empty cell is a missing value (never assumed: a
 * reading that needs it is refused, naming its dates); anything else that is
 * not a number, an impossible date or overlapping periods is an error naming
 * the file, the row and the field.
 */
import { addDays, MissingVariableValuesError, parseIsoDate, type VariableSeries } from '../../engine/index.js';
import { cell, readCsvTable } from '../../lib/csv/csv-table.js';
import { InputFileError, UsageError } from '../errors.js';

const DECIMAL = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;
const TOTAL_SUFFIX = ':total';

export interface VariablesFile {
  file: string;
  series: VariableSeries[];
}

export async function loadVariables(file: string): Promise<VariablesFile> {
  const table = await readCsvTable(file);
  const daily = table.columns.includes('date');
  const periods = table.columns.includes('start') && table.columns.includes('end');
  if (daily === periods) {
    throw new InputFileError(
      table.file,
      table.headerLine,
      null,
      'the header needs a date column (daily values) or start and end columns (values over periods), not both',
    );
  }
  const keys = daily ? ['date'] : ['start', 'end'];
  const columns = table.columns.filter((c) => c !== '' && !keys.includes(c));
  if (columns.length === 0)
    throw new InputFileError(table.file, table.headerLine, null, 'no variable columns beside ' + keys.join(','));
  const series = columns.map((column) => ({
    column,
    name: column.endsWith(TOTAL_SUFFIX) ? column.slice(0, -TOTAL_SUFFIX.length) : column,
    aggregation: column.endsWith(TOTAL_SUFFIX) ? ('total' as const) : ('mean' as const),
    values: [] as { start: string; end: string; value: number }[],
  }));
  const spans: { start: string; end: string; line: number }[] = [];
  for (const row of table.rows) {
    const start = cell(row, daily ? 'date' : 'start');
    if (parseIsoDate(start) === null)
      throw new InputFileError(table.file, row.line, daily ? 'date' : 'start', `not a calendar date: "${start}"`);
    const end = daily ? addDays(start, 1) : cell(row, 'end');
    if (!daily && (parseIsoDate(end) === null || !(end > start))) {
      throw new InputFileError(
        table.file,
        row.line,
        'end',
        `must be a calendar date after start (${start}), got "${end}"`,
      );
    }
    spans.push({ start, end, line: row.line });
    for (const s of series) {
      const text = cell(row, s.column).trim();
      if (text === '') continue;
      if (!DECIMAL.test(text) || !Number.isFinite(Number(text)))
        throw new InputFileError(table.file, row.line, s.column, `not a number: "${text}"`);
      s.values.push({ start, end, value: Number(text) });
    }
  }
  spans.sort((a, b) => (a.start < b.start ? -1 : a.start > b.start ? 1 : 0));
  for (let i = 1; i < spans.length; i++) {
    if (spans[i]!.start < spans[i - 1]!.end) {
      throw new InputFileError(
        table.file,
        spans[i]!.line,
        daily ? 'date' : 'start',
        `${spans[i]!.start}..${spans[i]!.end} overlaps row ${spans[i - 1]!.line}`,
      );
    }
  }
  return { file: table.file, series: series.map(({ name, aggregation, values }) => ({ name, aggregation, values })) };
}

/** A model's missing values as the command line tells it: the file, and the periods and variables without values. */
export function explainMissingValues(
  error: MissingVariableValuesError,
  file: VariablesFile | null,
  what: string,
): UsageError {
  return new UsageError(`${file ? `${file.file}: ` : ''}${error.message} (${what})`);
}
