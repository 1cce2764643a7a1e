/**
 * The columns of every table in the export document, per format version:
 * each column's type, nullability and allowed values (version 1 is exactly
 * the ledger's columns), the columns added since and the value an older
 * document's row gets for them, and the tables whose ids are global.
 */
import { documentTemperatureForm } from '../baseline-content.js';
import { ROLES } from '../api-keys.js';
import { VARIABLE_AGGREGATIONS, VARIABLE_KINDS } from '../../engine/index.js';
import type { Cell, ExportRow, TransferTable } from './document.js';

export interface ColumnRule {
  type: 'text' | 'real' | 'integer';
  nullable?: boolean;
  oneOf?: readonly Cell[];
  /** Smallest allowed number. */
  min?: number;
}

export interface TableRule {
  key: readonly string[];
  columns: Record<string, ColumnRule>;
}

export const TEXT: ColumnRule = { type: 'text' };
export const TEXT_OR_NULL: ColumnRule = { type: 'text', nullable: true };
export const REAL: ColumnRule = { type: 'real' };
export const REAL_OR_NULL: ColumnRule = { type: 'real', nullable: true };
export const INTEGER: ColumnRule = { type: 'integer' };

export const ORGANISATION_RULE: TableRule = { key: ['id'], columns: { id: TEXT, name: TEXT, created_at: TEXT } };

export const TABLE_RULES: Record<TransferTable, TableRule> = {
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
    columns: {
      id: TEXT,
      organisation_id: TEXT,
      name: TEXT,
      temperature_unit: { type: 'text', oneOf: ['F', 'C'] },
      created_at: TEXT,
    },
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
    columns: {
      id: TEXT,
      organisation_id: TEXT,
      name: TEXT,
      address: TEXT_OR_NULL,
      floor_area: REAL_OR_NULL,
      created_at: TEXT,
    },
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
  variables: {
    key: ['id'],
    columns: {
      id: TEXT,
      organisation_id: TEXT,
      facility_id: TEXT,
      meter_id: TEXT_OR_NULL,
      name: TEXT,
      unit: TEXT,
      kind: { type: 'text', oneOf: VARIABLE_KINDS },
      aggregation: { type: 'text', oneOf: VARIABLE_AGGREGATIONS },
      created_at: TEXT,
      created_by: TEXT,
    },
  },
  variable_values: {
    key: ['variable_id', 'period_start'],
    columns: { variable_id: TEXT, period_start: TEXT, period_end: TEXT, value: REAL, updated_at: TEXT },
  },
  facility_calendars: {
    key: ['facility_id'],
    columns: { facility_id: TEXT, organisation_id: TEXT, calendar_json: TEXT, updated_at: TEXT, updated_by: TEXT },
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
export function columnsAddedAfter(
  table: TransferTable,
  version: number,
): Record<string, (row: ExportRow) => Cell> | undefined {
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
export function ruleFor(table: TransferTable, version: number): TableRule {
  const rule = TABLE_RULES[table];
  const added = columnsAddedAfter(table, version);
  if (!added) return rule;
  return {
    key: rule.key,
    columns: Object.fromEntries(Object.entries(rule.columns).filter(([column]) => !Object.hasOwn(added, column))),
  };
}

/** Tables whose id is unique across the whole database, not only within the organisation. */
export const GLOBAL_ID_TABLES = [
  'api_keys',
  'weather_stations',
  'facilities',
  'meters',
  'baselines',
  'adjustments',
  'statements',
  'variables',
] as const;
