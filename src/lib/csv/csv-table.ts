/**
 * A CSV file as a header and rows, each row keeping its line number in the
 * file (header = line 1) so every problem can point at it. Header names are
 * trimmed and compared case-insensitively; extra columns are ignored.
 */
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import type { parse as csvParse } from 'csv-parse/sync';
import { InputFileError } from './input-error.js';

export interface CsvRow {
  /** Line number in the file where the record ends (the same line unless a quoted cell spans lines). */
  line: number;
  /** Cell text by lower-case column name; a short row simply lacks the later columns. */
  cells: ReadonlyMap<string, string>;
}

export interface CsvTable {
  /** The file name as the user gave it, for messages. */
  file: string;
  headerLine: number;
  columns: string[];
  rows: CsvRow[];
}

export interface ParsedRecord {
  record: string[];
  info: { lines: number };
}

interface CsvParseFailure {
  code: string;
  message: string;
  lines?: number;
  index?: number;
  records?: number;
}

const PARSE_OPTIONS = { bom: true, trim: true, skip_empty_lines: true, relax_column_count: true, info: true } as const;

/**
 * csv-parse, loaded on first use (its single CommonJS file, by require): a
 * plain file never needs it, and a command's start-up is spared its modules.
 */
let loadedParse: typeof csvParse | undefined;
const parse: typeof csvParse = ((text: string, options: object) => {
  loadedParse ??= (createRequire(import.meta.url)('csv-parse/sync') as { parse: typeof csvParse }).parse;
  return loadedParse(text, options);
}) as typeof csvParse;

/** Printable ASCII without the quote character, and line ends: text that needs none of the full parser's rules. */
const PLAIN_TEXT = /^[\x20\x21\x23-\x7e\r\n]*$/;
/** A carriage return not before a line feed, or a line feed not after one: mixed line ends. */
const MIXED_LINE_ENDS = /\r(?!\n)|(?<!\r)\n/;

/**
 * The records csv-parse gives with PARSE_OPTIONS, split by hand, for the
 * common plain file: no quotes, no tabs, printable ASCII, every line ending
 * in LF or every one in CRLF. Null for anything else (the full parser reads
 * it). Every number file a meter or station exports is plain, and splitting
 * it is many times quicker than the parser's first run in a fresh process.
 */
export function parsePlainCsv(text: string): ParsedRecord[] | null {
  const body = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  if (!PLAIN_TEXT.test(body)) return null;
  const crlf = body.includes('\r');
  if (crlf && MIXED_LINE_ENDS.test(body)) return null;
  const lines = body.split(crlf ? '\r\n' : '\n');
  const records: ParsedRecord[] = [];
  for (let i = 0; i < lines.length; i++) {
    const line = lines[i]!;
    // A line of nothing but spaces is an empty line once trimmed: skipped.
    if (line.trim() === '') continue;
    records.push({ record: line.split(',').map((field) => field.trim()), info: { lines: i + 1 } });
  }
  return records;
}

/**
 * Only the command line reads files. Read in one synchronous call: the
 * promise API sends the read through the thread pool and the process sits
 * idle waiting for it, which a short-lived command pays in full.
 */
export async function readCsvTable(file: string): Promise<CsvTable> {
  let text: string;
  try {
    text = readFileSync(file, 'utf8');
  } catch (error) {
    throw new InputFileError(file, null, null, `cannot read the file (${describeFileError(error)})`);
  }
  return parseCsvTable(file, text);
}

export function parseCsvTable(file: string, text: string): CsvTable {
  let records: ParsedRecord[];
  try {
    records = parsePlainCsv(text) ?? (parse(text, PARSE_OPTIONS) as unknown as ParsedRecord[]);
  } catch (error) {
    throw csvSyntaxError(file, text, error);
  }
  const [header, ...body] = records;
  if (!header) throw new InputFileError(file, 1, null, 'the file is empty: a header row is needed');
  const columns = header.record.map((name) => name.trim().toLowerCase());
  columns.forEach((name, index) => {
    if (name !== '' && columns.indexOf(name) !== index) {
      throw new InputFileError(file, header.info.lines, name, 'the column appears more than once in the header');
    }
  });
  const rows = body.map(({ record, info }) => {
    const cells = new Map<string, string>();
    record.forEach((value, index) => {
      const name = columns[index];
      if (name) cells.set(name, value);
    });
    return { line: info.lines, cells };
  });
  return { file, headerLine: header.info.lines, columns, rows };
}

/** Throw unless every named column is in the header. */
export function requireColumns(table: CsvTable, names: readonly string[]): void {
  for (const name of names) {
    if (!table.columns.includes(name)) {
      const found = table.columns.filter((c) => c !== '').join(', ') || 'no named columns';
      throw new InputFileError(
        table.file,
        table.headerLine,
        name,
        `missing column "${name}" (the header has: ${found})`,
      );
    }
  }
}

export function cell(row: CsvRow, column: string): string {
  return row.cells.get(column) ?? '';
}

function csvSyntaxError(file: string, text: string, error: unknown): Error {
  const failure = error as Partial<CsvParseFailure>;
  if (typeof failure?.code !== 'string' || (!failure.code.startsWith('CSV_') && !failure.code.startsWith('INVALID_'))) {
    return error instanceof Error ? error : new Error(String(error));
  }
  let line = typeof failure.lines === 'number' ? failure.lines : null;
  let detail = failure.message ?? failure.code;
  if (failure.code === 'CSV_QUOTE_NOT_CLOSED' && typeof failure.records === 'number') {
    // The parser only notices at the end of the file; point at the row where the quote opened instead.
    line = lineAfterRecords(text, failure.records) ?? line;
    detail = 'a quoted cell is never closed (a " opens on this row and no closing " follows)';
  }
  return new InputFileError(file, line, headerNameAt(text, failure.index), `not valid CSV: ${detail}`);
}

/** The first non-blank line after the first `records` records, which parse cleanly. */
function lineAfterRecords(text: string, records: number): number | null {
  try {
    const parsed = records > 0 ? (parse(text, { ...PARSE_OPTIONS, to: records }) as unknown as ParsedRecord[]) : [];
    const lastGoodLine = parsed[parsed.length - 1]?.info.lines ?? 0;
    const lines = text.split(/\r\n|\n|\r/);
    for (let k = lastGoodLine; k < lines.length; k++) if (lines[k]!.trim() !== '') return k + 1;
    return null;
  } catch {
    return null;
  }
}

/** The header's name for a field index, read from the first line alone (the rest may not parse). */
function headerNameAt(text: string, index: number | undefined): string | null {
  if (typeof index !== 'number') return null;
  try {
    const [header] = parse(text, { bom: true, trim: true, skip_empty_lines: true, to_line: 1 }) as string[][];
    return header?.[index]?.toLowerCase() ?? `column ${index + 1}`;
  } catch {
    return `column ${index + 1}`;
  }
}

function describeFileError(error: unknown): string {
  const code = (error as { code?: unknown })?.code;
  switch (code) {
    case 'ENOENT':
      return 'no such file';
    case 'EISDIR':
      return 'it is a directory';
    case 'EACCES':
    case 'EPERM':
      return 'permission denied';
    default:
      return typeof code === 'string' ? code : error instanceof Error ? error.message : String(error);
  }
}
