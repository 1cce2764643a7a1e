/**
 * Meter readings from CSV: columns start, end, quantity, and optionally
 * estimated. Checked by the engine's checkReadings (dates, end after start,
 * quantity, duplicates and overlaps) after the cells themselves are read.
 */
import { checkReadings, type Reading } from '../../engine/index.js';
import { cell, readCsvTable, requireColumns, type CsvTable } from '../../lib/csv/csv-table.js';
import { parseFlagCell, parseNumberCell } from '../../lib/csv/cells.js';
import { locateProblems, throwFirstProblem, type LocatedProblem } from './problems.js';

export interface ReadingsFile {
  file: string;
  headerLine: number;
  readings: Reading[];
  /** Line in the file of each reading, by index. */
  lines: number[];
}

const COLUMN_ORDER = ['start', 'end', 'quantity', 'estimated'];

export async function loadReadings(file: string): Promise<ReadingsFile> {
  return readingsFromTable(await readCsvTable(file));
}

export function readingsFromTable(table: CsvTable): ReadingsFile {
  requireColumns(table, ['start', 'end', 'quantity']);
  const hasEstimated = table.columns.includes('estimated');
  const problems: LocatedProblem[] = [];
  const readings: Reading[] = [];
  const lines: number[] = [];
  for (const row of table.rows) {
    const quantity = parseNumberCell(cell(row, 'quantity'));
    if (!quantity.ok) problems.push({ line: row.line, field: 'quantity', message: quantity.message });
    const reading: Reading = {
      start: cell(row, 'start'),
      end: cell(row, 'end'),
      quantity: quantity.ok ? quantity.value : Number.NaN,
    };
    if (hasEstimated) {
      const estimated = parseFlagCell(cell(row, 'estimated'));
      if (estimated.ok) reading.estimated = estimated.value;
      else problems.push({ line: row.line, field: 'estimated', message: estimated.message });
    }
    readings.push(reading);
    lines.push(row.line);
  }
  problems.push(...locateProblems(checkReadings(readings), lines));
  throwFirstProblem(table.file, problems, COLUMN_ORDER);
  return { file: table.file, headerLine: table.headerLine, readings, lines };
}
