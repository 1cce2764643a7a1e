/**
 * The engineer's exclusions from CSV: columns start, end, reason, one
 * baseline reading per row (its period, end exclusive). A row that names no
 * reading of the baseline, repeats one, or lacks a reason is an error naming
 * the file, the row and the field.
 */
import { applyExclusions, ExclusionError, type Exclusion, type Reading } from '../../engine/index.js';
import { cell, readCsvTable, requireColumns } from '../../lib/csv/csv-table.js';
import { InputFileError } from '../errors.js';

export interface ExclusionsFile {
  file: string;
  exclusions: Exclusion[];
  lines: number[];
}

export async function loadExclusions(file: string): Promise<ExclusionsFile> {
  const table = await readCsvTable(file);
  requireColumns(table, ['start', 'end', 'reason']);
  const exclusions: Exclusion[] = [];
  const lines: number[] = [];
  for (const row of table.rows) {
    exclusions.push({ start: cell(row, 'start'), end: cell(row, 'end'), reason: cell(row, 'reason') });
    lines.push(row.line);
  }
  return { file: table.file, exclusions, lines };
}

/** Check the exclusions against the baseline readings (the engine's rules), as a file error naming the row and field. */
export function checkExclusions(exclusions: ExclusionsFile, readings: readonly Reading[]): void {
  try {
    applyExclusions(readings, exclusions.exclusions);
  } catch (error) {
    if (!(error instanceof ExclusionError)) throw error;
    const index = /^exclusions\[(\d+)\]/.exec(error.field);
    const line = index ? (exclusions.lines[Number(index[1])] ?? null) : null;
    const field = error.field.endsWith('.reason') ? 'reason' : index ? 'start' : null;
    throw new InputFileError(
      exclusions.file,
      line,
      field,
      error.message.replace(/^exclusions(\[\d+\](\.reason)?)?: /, ''),
    );
  }
}
