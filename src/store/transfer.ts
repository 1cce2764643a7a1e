/**
 * Moving one organisation between databases: `exportOrganisation` reads every
 * row of it, exactly as stored, into one document (our own format,
 * "mvledger-export" version 4); `importOrganisation` checks such a document
 * and stores it in another database in one transaction, or stores nothing.
 *
 * What the checks can prove: the audit trail inside the document recomputes
 * to the head it states, and every frozen (or superseded) baseline still
 * matches its content hash. Other rows carry no hash of their own; an edited
 * reading or name passes if it is well formed.
 *
 * API keys travel as their hashes, so a key keeps working after the move.
 * Idempotency keys are transient and stay behind.
 */
import type { Kysely, Transaction } from 'kysely';
import { sha256Hex } from '../lib/canonical-json.js';
import { documentTemperatureForm, verifyBaselineContent } from './baseline-content.js';
import { ROLES } from './api-keys.js';
import { GENESIS_HASH, verifyAuditChain, verifyAuditRows, type ChainVerdict } from './audit.js';
import { readSnapshot, writeTransaction } from './connect.js';
import { bumpMeterVersions } from './data-versions.js';
import { firstRuleBroken } from './transfer-rules.js';
import type { AuditRow, BaselineRow, Database } from './schema.js';

export const EXPORT_FORMAT = 'mvledger-export';
export const EXPORT_VERSION = 5;
/**
 * Version 1 predates adjustments, rates, contracts and normal years: it is
 * read with those tables empty. Older versions predate the columns of
 * COLUMNS_SINCE_VERSION (3: a baseline's form and overrides, an adjustment's
 * ±; 4: a contract's identification and confidence; 5: how a weather day
 * was filled): they are read with those columns defaulted. Versions 1 to 3
 * predate statements: read with those tables empty.
 */
const READABLE_VERSIONS = [1, 2, 3, 4, 5] as const;
const TABLES_SINCE_VERSION_2 = ['adjustments', 'rates', 'contracts', 'normal_years'] as const;
const TABLES_SINCE_VERSION_4 = ['statements', 'statement_copies'] as const;

/** The organisation's tables in foreign-key order: the order of insertion. */
export const TRANSFER_TABLES = [
  'api_keys',
  'weather_stations',
  'weather_observations',
  'normal_years',
  'facilities',
  'contracts',
  'meters',
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

// ---------------------------------------------------------------------------
// The columns of format version 1: exactly the ledger's columns.

interface ColumnRule {
  type: 'text' | 'real' | 'integer';
  nullable?: boolean;
  oneOf?: readonly Cell[];
  /** Smallest allowed number. */
  min?: number;
}

interface TableRule {
  key: readonly string[];
  columns: Record<string, ColumnRule>;
}

const TEXT: ColumnRule = { type: 'text' };
const TEXT_OR_NULL: ColumnRule = { type: 'text', nullable: true };
const REAL: ColumnRule = { type: 'real' };
const REAL_OR_NULL: ColumnRule = { type: 'real', nullable: true };
const INTEGER: ColumnRule = { type: 'integer' };

const ORGANISATION_RULE: TableRule = { key: ['id'], columns: { id: TEXT, name: TEXT, created_at: TEXT } };

const TABLE_RULES: Record<TransferTable, TableRule> = {
  api_keys: {
    key: ['id'],
    columns: {
      id: TEXT,
      organisation_id: TEXT,
      name: TEXT,
      role: { type: 'text', oneOf: ROLES },
      secret_hash: TEXT,
      created_at: TEXT,
      revoked_at: TEXT_OR_NULL,
    },
  },
  weather_stations: {
    key: ['id'],
    columns: { id: TEXT, organisation_id: TEXT, name: TEXT, temperature_unit: { type: 'text', oneOf: ['F', 'C'] }, created_at: TEXT },
  },
  weather_observations: {
    key: ['station_id', 'date'],
    columns: {
      station_id: TEXT,
      date: TEXT,
      temp: REAL,
      tmin: REAL_OR_NULL,
      tmax: REAL_OR_NULL,
      updated_at: TEXT,
      fill_method: { type: 'text', nullable: true, oneOf: ['interpolation', 'second-station'] },
      fill_note: TEXT_OR_NULL,
    },
  },
  facilities: {
    key: ['id'],
    columns: { id: TEXT, organisation_id: TEXT, name: TEXT, address: TEXT_OR_NULL, floor_area: REAL_OR_NULL, created_at: TEXT },
  },
  meters: {
    key: ['id'],
    columns: {
      id: TEXT,
      organisation_id: TEXT,
      facility_id: TEXT,
      name: TEXT,
      fuel: TEXT,
      unit: TEXT,
      weather_station_id: TEXT,
      created_at: TEXT,
    },
  },
  readings: {
    key: ['meter_id', 'period_start', 'period_end'],
    columns: {
      meter_id: TEXT,
      period_start: TEXT,
      period_end: TEXT,
      quantity: REAL,
      estimated: { type: 'integer', oneOf: [0, 1] },
      cost: REAL_OR_NULL,
      created_at: TEXT,
      updated_at: TEXT,
    },
  },
  baselines: {
    key: ['id'],
    columns: {
      id: TEXT,
      organisation_id: TEXT,
      meter_id: TEXT,
      version: INTEGER,
      period_start: TEXT,
      period_end: TEXT,
      status: { type: 'text', oneOf: ['draft', 'frozen', 'superseded'] },
      options_json: TEXT,
      document_json: TEXT,
      fits_json: TEXT,
      inputs_json: TEXT,
      selected_model: TEXT,
      chosen_model: TEXT,
      choice_reason: TEXT_OR_NULL,
      content_hash: TEXT_OR_NULL,
      note: TEXT_OR_NULL,
      frozen_at: TEXT_OR_NULL,
      frozen_by: TEXT_OR_NULL,
      supersedes_id: TEXT_OR_NULL,
      supersede_reason: TEXT_OR_NULL,
      created_at: TEXT,
      created_by: TEXT,
      temperature_form: { type: 'text', oneOf: ['daily', 'mean'] },
      short_baseline_override: TEXT_OR_NULL,
      extrapolation_override: TEXT_OR_NULL,
    },
  },
  normal_years: {
    key: ['station_id'],
    columns: { station_id: TEXT, source: TEXT, temps_json: TEXT, content_hash: TEXT, updated_at: TEXT },
  },
  contracts: {
    key: ['facility_id'],
    columns: {
      facility_id: TEXT,
      organisation_id: TEXT,
      contract_start: TEXT,
      years: INTEGER,
      currency: TEXT_OR_NULL,
      energy_unit: TEXT,
      guarantees_json: TEXT,
      updated_at: TEXT,
      reference: TEXT_OR_NULL,
      parties_json: TEXT,
      mv_plan_reference: TEXT_OR_NULL,
      mv_option: { type: 'text', nullable: true, oneOf: ['A', 'B', 'C', 'D'] },
      confidence: { type: 'real', oneOf: [0.68, 0.8, 0.9, 0.95] },
    },
  },
  statements: {
    key: ['id'],
    columns: {
      id: TEXT,
      organisation_id: TEXT,
      status: { type: 'text', oneOf: ['prepared', 'approved', 'rejected', 'voided'] },
      request_json: TEXT,
      window_from: TEXT,
      window_to: TEXT,
      window_kind: TEXT,
      window_label: TEXT,
      facility_id: TEXT_OR_NULL,
      confidence: REAL,
      note: TEXT_OR_NULL,
      audit_seq: INTEGER,
      audit_hash: TEXT,
      report_hash: TEXT,
      data_through: TEXT_OR_NULL,
      prepared_by: TEXT,
      prepared_at: TEXT,
      approved_by: TEXT_OR_NULL,
      approved_at: TEXT_OR_NULL,
      rejected_by: TEXT_OR_NULL,
      rejected_at: TEXT_OR_NULL,
      rejection_reason: TEXT_OR_NULL,
      voided_by: TEXT_OR_NULL,
      voided_at: TEXT_OR_NULL,
      void_reason: TEXT_OR_NULL,
      replaced_by: TEXT_OR_NULL,
    },
  },
  statement_copies: {
    key: ['statement_id', 'copy'],
    columns: {
      statement_id: TEXT,
      copy: INTEGER,
      organisation_id: TEXT,
      kind: { type: 'text', oneOf: ['issued', 'approved', 'rejected', 'voided'] },
      created_at: TEXT,
      json_body: TEXT,
      csv_body: TEXT,
      html_body: TEXT,
      json_hash: TEXT,
      csv_hash: TEXT,
      html_hash: TEXT,
    },
  },
  rates: {
    key: ['meter_id', 'effective_from'],
    columns: {
      meter_id: TEXT,
      effective_from: TEXT,
      effective_to: TEXT_OR_NULL,
      price: REAL,
      escalation: REAL,
      currency: TEXT,
      updated_at: TEXT,
    },
  },
  adjustments: {
    key: ['id'],
    columns: {
      id: TEXT,
      organisation_id: TEXT,
      meter_id: TEXT,
      period_start: TEXT,
      period_end: TEXT,
      quantity: REAL_OR_NULL,
      per_day: REAL_OR_NULL,
      reason: TEXT,
      created_at: TEXT,
      created_by: TEXT,
      withdrawn_at: TEXT_OR_NULL,
      withdrawn_by: TEXT_OR_NULL,
      withdraw_reason: TEXT_OR_NULL,
      uncertainty: { type: 'real', nullable: true, min: 0 },
    },
  },
  audit_log: {
    key: ['seq'],
    columns: {
      organisation_id: TEXT,
      seq: INTEGER,
      actor: TEXT,
      at: TEXT,
      action: TEXT,
      entity_type: TEXT,
      entity_id: TEXT,
      before_json: TEXT_OR_NULL,
      after_json: TEXT_OR_NULL,
      prev_hash: TEXT,
      hash: TEXT,
    },
  },
};

type AddedColumns = Partial<Record<TransferTable, Record<string, (row: ExportRow) => Cell>>>;

/**
 * Columns added in a format version, and the value an older document's row
 * gets. Version 3: a baseline's temperature form is the one its fit
 * document states (mean for documents from before the form existed); no
 * override; no stated ± on an adjustment. Version 4: a contract stored
 * before them has no identification and the default confidence level.
 * Version 5: every weather day of an older document was observed, none
 * filled.
 */
const COLUMNS_SINCE_VERSION: Record<number, AddedColumns> = {
  3: {
    baselines: {
      temperature_form: (row) => formOfDocument(row.document_json),
      short_baseline_override: () => null,
      extrapolation_override: () => null,
    },
    adjustments: { uncertainty: () => null },
  },
  4: {
    contracts: {
      reference: () => null,
      parties_json: () => '[]',
      mv_plan_reference: () => null,
      mv_option: () => null,
      confidence: () => 0.9,
    },
  },
  5: { weather_observations: { fill_method: () => null, fill_note: () => null } },
};

/** The columns of `table` that a document of `version` lacks, with their defaults. */
function columnsAddedAfter(table: TransferTable, version: number): Record<string, (row: ExportRow) => Cell> | undefined {
  const added = Object.entries(COLUMNS_SINCE_VERSION)
    .filter(([since]) => Number(since) > version)
    .flatMap(([, tables]) => Object.entries(tables[table] ?? {}));
  return added.length > 0 ? Object.fromEntries(added) : undefined;
}

function formOfDocument(documentJson: Cell | undefined): Cell {
  try {
    return typeof documentJson === 'string' ? documentTemperatureForm(documentJson) : 'mean';
  } catch {
    return 'mean'; // a document that does not parse fails its content-hash check anyway
  }
}

/** The rule of a table in a document of `version`: older versions lack the columns added since. */
function ruleFor(table: TransferTable, version: number): TableRule {
  const rule = TABLE_RULES[table];
  const added = columnsAddedAfter(table, version);
  if (!added) return rule;
  return { key: rule.key, columns: Object.fromEntries(Object.entries(rule.columns).filter(([column]) => !Object.hasOwn(added, column))) };
}

/** Tables whose id is unique across the whole database, not only within the organisation. */
const GLOBAL_ID_TABLES = ['api_keys', 'weather_stations', 'facilities', 'meters', 'baselines', 'adjustments', 'statements'] as const;

// ---------------------------------------------------------------------------
// Export.

/**
 * The organisation's document, read in one transaction (a snapshot on
 * PostgreSQL) and checked exactly as an import would check it, so a source
 * whose audit chain or frozen baselines no longer verify is not exported.
 */
export async function exportOrganisation(db: Kysely<Database>, organisationId: string, exportedAt: string): Promise<ExportDocument> {
  const document = await readSnapshot(db, (trx) => readOrganisation(trx, organisationId, exportedAt));
  try {
    return checkDocument(document);
  } catch (error) {
    if (error instanceof TransferInputError)
      throw new TransferInputError(`organisation ${organisationId} cannot be exported as stored: ${error.message}`);
    throw error;
  }
}

async function readOrganisation(trx: Transaction<Database>, organisationId: string, exportedAt: string): Promise<ExportDocument> {
  const organisation = await trx.selectFrom('organisations').selectAll().where('id', '=', organisationId).executeTakeFirst();
  if (!organisation) throw new TransferInputError(`no organisation ${organisationId}`);
  const stations = trx.selectFrom('weather_stations').select('id').where('organisation_id', '=', organisationId);
  const meters = trx.selectFrom('meters').select('id').where('organisation_id', '=', organisationId);
  const raw: Record<TransferTable, unknown[]> = {
    api_keys: await trx.selectFrom('api_keys').selectAll().where('organisation_id', '=', organisationId).execute(),
    weather_stations: await trx.selectFrom('weather_stations').selectAll().where('organisation_id', '=', organisationId).execute(),
    weather_observations: await trx.selectFrom('weather_observations').selectAll().where('station_id', 'in', stations).execute(),
    facilities: await trx.selectFrom('facilities').selectAll().where('organisation_id', '=', organisationId).execute(),
    meters: await trx.selectFrom('meters').selectAll().where('organisation_id', '=', organisationId).execute(),
    readings: await trx.selectFrom('readings').selectAll().where('meter_id', 'in', meters).execute(),
    normal_years: await trx.selectFrom('normal_years').selectAll().where('station_id', 'in', stations).execute(),
    contracts: await trx.selectFrom('contracts').selectAll().where('organisation_id', '=', organisationId).execute(),
    rates: await trx.selectFrom('rates').selectAll().where('meter_id', 'in', meters).execute(),
    adjustments: await trx.selectFrom('adjustments').selectAll().where('organisation_id', '=', organisationId).execute(),
    baselines: await trx.selectFrom('baselines').selectAll().where('organisation_id', '=', organisationId).execute(),
    statements: await trx.selectFrom('statements').selectAll().where('organisation_id', '=', organisationId).execute(),
    statement_copies: await trx.selectFrom('statement_copies').selectAll().where('organisation_id', '=', organisationId).execute(),
    audit_log: await trx.selectFrom('audit_log').selectAll().where('organisation_id', '=', organisationId).execute(),
  };
  const tables = {} as Record<TransferTable, ExportRow[]>;
  for (const table of TRANSFER_TABLES) {
    // Sorted here, not by the database: text order depends on PostgreSQL's collation.
    tables[table] = (raw[table] as ExportRow[]).sort((a, b) => compareKeys(a, b, TABLE_RULES[table].key));
  }
  const last = tables.audit_log.at(-1);
  return {
    format: EXPORT_FORMAT,
    version: EXPORT_VERSION,
    exportedAt,
    organisation: { id: organisation.id, name: organisation.name, created_at: organisation.created_at },
    auditHead: last ? { seq: last.seq as number, hash: last.hash as string } : { seq: 0, hash: GENESIS_HASH },
    tables,
  };
}

function compareKeys(a: ExportRow, b: ExportRow, key: readonly string[]): number {
  for (const column of key) {
    const x = a[column];
    const y = b[column];
    if (x === y) continue;
    if (typeof x === 'number' && typeof y === 'number') return x - y;
    return String(x) < String(y) ? -1 : 1;
  }
  return 0;
}

// ---------------------------------------------------------------------------
// Checking a document: shape, references, audit chain, baseline hashes.

function isObject(value: unknown): value is Record<string, unknown> {
  return value !== null && typeof value === 'object' && !Array.isArray(value);
}

function shown(value: unknown): string {
  if (value === undefined) return 'nothing';
  const text = JSON.stringify(value) ?? String(value);
  return text.length > 60 ? `${text.slice(0, 57)}...` : text;
}

function fail(path: string, message: string): never {
  throw new TransferInputError(`${path}: ${message}`);
}

function checkCell(path: string, value: unknown, rule: ColumnRule): void {
  if (value === undefined) fail(path, 'missing');
  if (value === null) {
    if (!rule.nullable) fail(path, 'must not be null');
    return;
  }
  if (rule.type === 'text' && typeof value !== 'string') fail(path, `must be text, got ${shown(value)}`);
  if (rule.type === 'real' && !(typeof value === 'number' && Number.isFinite(value)))
    fail(path, `must be a finite number, got ${shown(value)}`);
  if (rule.type === 'integer' && !Number.isSafeInteger(value)) fail(path, `must be a whole number, got ${shown(value)}`);
  if (rule.min !== undefined && (value as number) < rule.min) fail(path, `must be at least ${rule.min}, got ${shown(value)}`);
  if (rule.oneOf && !rule.oneOf.includes(value as Cell)) fail(path, `must be one of ${rule.oneOf.join(', ')}, got ${shown(value)}`);
}

function checkRow(path: string, value: unknown, rule: TableRule, organisationId: string | null, version: number): ExportRow {
  if (!isObject(value)) fail(path, `must be an object, got ${shown(value)}`);
  for (const [column, columnRule] of Object.entries(rule.columns)) checkCell(`${path}.${column}`, value[column], columnRule);
  for (const column of Object.keys(value)) {
    if (!Object.hasOwn(rule.columns, column)) fail(`${path}.${column}`, `not a column of format version ${version}`);
  }
  if (organisationId !== null && 'organisation_id' in value && value.organisation_id !== organisationId) {
    fail(`${path}.organisation_id`, `must be the exported organisation ${organisationId}, got ${shown(value.organisation_id)}`);
  }
  return value as ExportRow;
}

function checkTable(table: TransferTable, value: unknown, organisationId: string, version: number): ExportRow[] {
  if (!Array.isArray(value)) fail(`tables.${table}`, `must be a list of rows, got ${shown(value)}`);
  const rule = ruleFor(table, version);
  const added = columnsAddedAfter(table, version);
  const seen = new Set<string>();
  return value.map((entry, index) => {
    const checked = checkRow(`tables.${table}[${index}]`, entry, rule, organisationId, version);
    const row = added
      ? { ...checked, ...Object.fromEntries(Object.entries(added).map(([column, fill]) => [column, fill(checked)])) }
      : checked;
    const key = JSON.stringify(rule.key.map((column) => row[column]));
    if (seen.has(key)) fail(`tables.${table}[${index}]`, `a second row with the key ${rule.key.join(', ')} = ${key}`);
    seen.add(key);
    return row;
  });
}

/** Every reference points at a row of the same document, so the import never leans on the target's other rows. */
function checkReferences(tables: Record<TransferTable, ExportRow[]>): void {
  const ids = (table: TransferTable) => new Set<Cell | undefined>(tables[table].map((row) => row.id));
  const stations = ids('weather_stations');
  const facilities = ids('facilities');
  const meters = ids('meters');
  const refer = (table: TransferTable, column: string, targets: Set<Cell | undefined>, what: string) => {
    tables[table].forEach((row, index) => {
      if (!targets.has(row[column])) fail(`tables.${table}[${index}].${column}`, `${shown(row[column])} is not a ${what} in the document`);
    });
  };
  refer('weather_observations', 'station_id', stations, 'weather station');
  refer('meters', 'facility_id', facilities, 'facility');
  refer('meters', 'weather_station_id', stations, 'weather station');
  refer('readings', 'meter_id', meters, 'meter');
  refer('baselines', 'meter_id', meters, 'meter');
  refer('normal_years', 'station_id', stations, 'weather station');
  refer('contracts', 'facility_id', facilities, 'facility');
  refer('rates', 'meter_id', meters, 'meter');
  refer('adjustments', 'meter_id', meters, 'meter');
  refer('statement_copies', 'statement_id', ids('statements'), 'statement');

  const baselines = new Map(tables.baselines.map((row) => [row.id, row]));
  const versions = new Set<string>();
  const frozenMeters = new Set<Cell>();
  tables.baselines.forEach((row, index) => {
    const path = `tables.baselines[${index}]`;
    const version = JSON.stringify([row.meter_id, row.version]);
    if (versions.has(version)) fail(`${path}.version`, `meter ${row.meter_id} has a second version ${row.version}`);
    versions.add(version);
    if (row.status === 'frozen') {
      if (frozenMeters.has(row.meter_id!)) fail(`${path}.status`, `meter ${row.meter_id} has a second frozen baseline`);
      frozenMeters.add(row.meter_id!);
    }
    if (row.supersedes_id === null) return;
    const older = baselines.get(row.supersedes_id!);
    if (!older || older.meter_id !== row.meter_id || (older.version as number) >= (row.version as number)) {
      fail(
        `${path}.supersedes_id`,
        `${shown(row.supersedes_id)} is not an earlier version of meter ${row.meter_id}'s baseline in the document`,
      );
    }
  });
}

function checkAuditTrail(organisationId: string, rows: readonly ExportRow[], head: { seq: number; hash: string }): void {
  const verdict = verifyAuditRows(organisationId, rows as unknown as AuditRow[]);
  if (!verdict.ok) {
    const index = rows.findIndex((row) => row.seq === verdict.broken!.seq);
    fail(`tables.audit_log[${index}]`, `the audit chain breaks at seq ${verdict.broken!.seq}: ${verdict.broken!.reason}`);
  }
  if (verdict.headSeq !== head.seq || verdict.headHash !== head.hash) {
    fail(
      'auditHead',
      `the audit chain ends at seq ${verdict.headSeq} with hash ${verdict.headHash}, not at the stated seq ${head.seq} with hash ${head.hash}`,
    );
  }
}

/** Frozen and superseded baselines (and any draft that claims a hash) must still match their content hash. */
function mustVerify(row: ExportRow): boolean {
  return row.status !== 'draft' || row.content_hash !== null;
}

function checkBaselineHashes(rows: readonly ExportRow[]): void {
  rows.forEach((row, index) => {
    if (mustVerify(row) && !verifyBaselineContent(row as unknown as BaselineRow)) {
      fail(`tables.baselines[${index}]`, `baseline ${row.id} (${row.status}) does not match its content hash ${shown(row.content_hash)}`);
    }
  });
}

/** Every stored statement copy still matches its content hashes: the bytes a statement was filed with travel unchanged. */
function checkStatementCopies(rows: readonly ExportRow[]): void {
  rows.forEach((row, index) => {
    for (const format of ['json', 'csv', 'html'] as const) {
      if (sha256Hex(row[`${format}_body`] as string) !== row[`${format}_hash`])
        fail(
          `tables.statement_copies[${index}].${format}_body`,
          `statement ${row.statement_id} copy ${row.copy} does not match its ${format} content hash`,
        );
    }
  });
}

/** The document if it is a well-formed, self-consistent export; else a TransferInputError naming the place. */
export function checkDocument(value: unknown): ExportDocument {
  if (!isObject(value)) fail('document', `must be a JSON object, got ${shown(value)}`);
  if (value.format !== EXPORT_FORMAT) fail('format', `must be ${JSON.stringify(EXPORT_FORMAT)}, got ${shown(value.format)}`);
  if (!(READABLE_VERSIONS as readonly unknown[]).includes(value.version)) {
    fail(
      'version',
      `this mvledger reads versions ${READABLE_VERSIONS.slice(0, -1).join(', ')} and ${READABLE_VERSIONS.at(-1)}, got ${shown(value.version)}`,
    );
  }
  if (typeof value.exportedAt !== 'string') fail('exportedAt', `must be text, got ${shown(value.exportedAt)}`);
  const version = value.version as number;
  const organisation = checkRow('organisation', value.organisation, ORGANISATION_RULE, null, version) as unknown as OrganisationRecord;
  const head = value.auditHead;
  if (!isObject(head)) fail('auditHead', `must be an object { seq, hash }, got ${shown(head)}`);
  checkCell('auditHead.seq', head.seq, INTEGER);
  checkCell('auditHead.hash', head.hash, TEXT);
  if (!isObject(value.tables)) fail('tables', `must be an object of tables, got ${shown(value.tables)}`);
  const later: readonly string[] = [...(version < 2 ? TABLES_SINCE_VERSION_2 : []), ...(version < 4 ? TABLES_SINCE_VERSION_4 : [])];
  const known: readonly string[] = TRANSFER_TABLES.filter((t) => !later.includes(t));
  for (const name of Object.keys(value.tables)) {
    if (!known.includes(name)) fail(`tables.${name}`, `not a table of format version ${shown(value.version)}`);
  }
  const tables = {} as Record<TransferTable, ExportRow[]>;
  for (const table of TRANSFER_TABLES)
    tables[table] = known.includes(table) ? checkTable(table, value.tables[table], organisation.id, version) : [];
  checkReferences(tables);
  const broken = firstRuleBroken(tables);
  if (broken) throw new TransferInputError(broken);
  const auditHead = { seq: head.seq as number, hash: head.hash as string };
  checkAuditTrail(organisation.id, tables.audit_log, auditHead);
  checkBaselineHashes(tables.baselines);
  checkStatementCopies(tables.statement_copies);
  return { format: EXPORT_FORMAT, version: EXPORT_VERSION, exportedAt: value.exportedAt, organisation, auditHead, tables };
}

// ---------------------------------------------------------------------------
// Import.

export interface ImportSummary {
  organisation: OrganisationRecord;
  rows: Record<TransferTable, number>;
  auditHead: { seq: number; hash: string };
}

/**
 * SQLite accepts at most 32,766 bound values in one statement (its default
 * SQLITE_MAX_VARIABLE_NUMBER since 3.32), PostgreSQL 65,535; rows are also
 * capped so a statement of large baseline documents stays moderate.
 */
const MAX_PARAMETERS = 32_766;
const MAX_ROWS_PER_INSERT = 500;

/**
 * Check the document, then store it in one transaction: refused when the
 * organisation (or any of its ids) is already in the target; checked again
 * after the inserts, from the target's own rows, before the commit.
 */
export async function importOrganisation(db: Kysely<Database>, input: unknown): Promise<ImportSummary> {
  const document = checkDocument(input);
  const { organisation, tables } = document;
  return writeTransaction(db, organisation.id, async (trx) => {
    await refuseExisting(trx, document);
    await trx.insertInto('organisations').values(organisation).execute();
    for (const table of TRANSFER_TABLES) await insertRows(trx, table, insertionOrder(table, tables[table]));
    // Data versions are not exported: the imported meters get fresh ones.
    for (const chunk of chunks(tables.meters, MAX_ROWS_PER_INSERT))
      await bumpMeterVersions(
        trx,
        chunk.map((row) => row.id as string),
      );
    await checkTarget(trx, document);
    const rows = {} as Record<TransferTable, number>;
    for (const table of TRANSFER_TABLES) rows[table] = tables[table].length;
    return { organisation, rows, auditHead: document.auditHead };
  });
}

async function refuseExisting(trx: Transaction<Database>, document: ExportDocument): Promise<void> {
  const { id } = document.organisation;
  const present = await trx.selectFrom('organisations').select('id').where('id', '=', id).executeTakeFirst();
  if (present) throw new TransferInputError(`organisation ${id} already exists in the target database`);
  for (const table of GLOBAL_ID_TABLES) {
    const ids = document.tables[table].map((row) => row.id as string);
    for (const chunk of chunks(ids, MAX_ROWS_PER_INSERT)) {
      const taken = await trx.selectFrom(table).select('id').where('id', 'in', chunk).executeTakeFirst();
      if (taken) throw new TransferInputError(`${table} id ${taken.id} already exists in the target database`);
    }
  }
}

/** A superseding baseline references an earlier version, so versions go in ascending order. */
function insertionOrder(table: TransferTable, rows: ExportRow[]): ExportRow[] {
  if (table !== 'baselines') return rows;
  return [...rows].sort((a, b) => (a.version as number) - (b.version as number) || compareKeys(a, b, ['id']));
}

function* chunks<T>(items: readonly T[], size: number): Generator<T[]> {
  for (let start = 0; start < items.length; start += size) yield items.slice(start, start + size);
}

async function insertRows(trx: Transaction<Database>, table: TransferTable, rows: readonly ExportRow[]): Promise<void> {
  const columns = Object.keys(TABLE_RULES[table].columns).length;
  const size = Math.min(MAX_ROWS_PER_INSERT, Math.floor(MAX_PARAMETERS / columns));
  // The rows were checked against the table's columns in checkDocument.
  for (const chunk of chunks(rows, size))
    await trx
      .insertInto(table)
      .values(chunk as never)
      .execute();
}

/** The target's own rows, read back inside the transaction: any mismatch rolls everything back. */
async function checkTarget(trx: Transaction<Database>, document: ExportDocument): Promise<void> {
  const { id } = document.organisation;
  const verdict: ChainVerdict = await verifyAuditChain(trx, id);
  if (!verdict.ok || verdict.headSeq !== document.auditHead.seq || verdict.headHash !== document.auditHead.hash) {
    const why = verdict.broken
      ? `breaks at seq ${verdict.broken.seq}: ${verdict.broken.reason}`
      : `ends at seq ${verdict.headSeq} with hash ${verdict.headHash}`;
    throw new Error(`after the import the target's audit chain of ${id} ${why}; nothing was stored`);
  }
  const baselines = await trx.selectFrom('baselines').selectAll().where('organisation_id', '=', id).execute();
  if (baselines.length !== document.tables.baselines.length)
    throw new Error(
      `after the import the target holds ${baselines.length} baselines of ${id}, not ${document.tables.baselines.length}; nothing was stored`,
    );
  for (const row of baselines) {
    if (mustVerify(row as unknown as ExportRow) && !verifyBaselineContent(row)) {
      throw new Error(`after the import baseline ${row.id} in the target does not match its content hash; nothing was stored`);
    }
  }
}
