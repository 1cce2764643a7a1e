/**
 * The CSV layer NOAA's CSV archive forms share: csv-parse with a byte-order
 * mark allowed, rows of any length and blank lines skipped, each row with
 * its line number; a file csv-parse cannot read, or one without a header,
 * is an ArchiveFormatError naming the line.
 */
import { parse } from 'csv-parse/sync';
import { ArchiveFormatError } from './types.js';

/** One CSV row and the line it ended on. */
export interface ArchiveCsvRow {
  record: string[];
  info: { lines: number };
}

/** The header row and the rows after it; `what` names the file kind in the empty-file message. */
export function readArchiveCsv(text: string, what: string): { header: ArchiveCsvRow; rows: ArchiveCsvRow[] } {
  let records: ArchiveCsvRow[];
  try {
    records = parse(text, {
      bom: true,
      relax_column_count: true,
      skip_empty_lines: true,
      info: true,
    }) as unknown as ArchiveCsvRow[];
  } catch (error) {
    const failure = error as { lines?: number; message?: string };
    throw new ArchiveFormatError(failure.lines ?? 1, null, `not readable as CSV: ${failure.message ?? 'syntax error'}`);
  }
  const [header, ...rows] = records;
  if (!header) throw new ArchiveFormatError(1, null, `the file is empty: ${what} starts with its header`);
  return { header, rows };
}
