/**
 * The export document of one organisation (our own format, "mvledger-export"):
 * its format and version, the versions still read, the tables it carries in
 * foreign-key order, and the error a user can fix.
 */
export const EXPORT_FORMAT = 'mvledger-export';
export const EXPORT_VERSION = 6;
/**
 * Version 1 predates adjustments, rates, contracts and normal years: it is
 * read with those tables empty. Older versions predate the columns of
 * COLUMNS_SINCE_VERSION (3: a baseline's form and overrides, an adjustment's
 * ±; 4: a contract's identification and confidence; 5: how a weather day
 * was filled): they are read with those columns defaulted. Versions 1 to 3
 * predate statements: read with those tables empty. Versions 1 to 5 predate
 * independent variables and facility calendars: read with those tables empty.
 */
export const READABLE_VERSIONS = [1, 2, 3, 4, 5, 6] as const;
export const TABLES_SINCE_VERSION_2 = ['adjustments', 'rates', 'contracts', 'normal_years'] as const;
export const TABLES_SINCE_VERSION_4 = ['statements', 'statement_copies'] as const;
export const TABLES_SINCE_VERSION_6 = ['variables', 'variable_values', 'facility_calendars'] as const;

/** The organisation's tables in foreign-key order: the order of insertion. */
export const TRANSFER_TABLES = [
  'api_keys',
  'weather_stations',
  'weather_observations',
  'normal_years',
  'facilities',
  'contracts',
  'meters',
  'facility_calendars',
  'variables',
  'variable_values',
  'readings',
  'rates',
  'adjustments',
  'baselines',
  'statements',
  'statement_copies',
  'audit_log',
] as const;
export type TransferTable = (typeof TRANSFER_TABLES)[number];

export type Cell = string | number | null;
export type ExportRow = Record<string, Cell>;

export interface OrganisationRecord {
  id: string;
  name: string;
  created_at: string;
}

export interface ExportDocument {
  format: typeof EXPORT_FORMAT;
  version: typeof EXPORT_VERSION;
  exportedAt: string;
  organisation: OrganisationRecord;
  /** The last audit row: seq 0 and the genesis hash for an empty trail. */
  auditHead: { seq: number; hash: string };
  /** Rows by table, each table ordered by its primary key. */
  tables: Record<TransferTable, ExportRow[]>;
}

/** The document or the source cannot be used: the user can fix it (exit code 2). */
export class TransferInputError extends Error {
  override name = 'TransferInputError';
}

/** Rows compared by the columns of a table's key: numbers by value, anything else as text. */
export function compareKeys(a: ExportRow, b: ExportRow, key: readonly string[]): number {
  for (const column of key) {
    const x = a[column];
    const y = b[column];
    if (x === y) continue;
    if (typeof x === 'number' && typeof y === 'number') return x - y;
    return String(x) < String(y) ? -1 : 1;
  }
  return 0;
}
