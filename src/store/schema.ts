/**
 * The database as kysely sees it: one interface per table. Column types are
 * kept dialect-neutral (text, integer, double precision): booleans are 0/1
 * integers, timestamps ISO-8601 text, JSON documents text.
 */
import type { Insertable, Selectable, Updateable } from 'kysely';
import type { FillMethod } from '../engine/weather-gaps.js';
import type { Role } from '../domain/principal.js';

export interface OrganisationsTable {
  id: string;
  name: string;
  created_at: string;
}

export interface ApiKeysTable {
  /** Public key id, the middle part of mvl_<id>_<secret>. */
  id: string;
  organisation_id: string;
  name: string;
  role: Role;
  /** SHA-256 of the secret part; the secret itself is never stored. */
  secret_hash: string;
  created_at: string;
  revoked_at: string | null;
}

export interface WeatherStationsTable {
  id: string;
  organisation_id: string;
  name: string;
  temperature_unit: 'F' | 'C';
  created_at: string;
}

export interface WeatherObservationsTable {
  station_id: string;
  date: string;
  /** Daily mean, given or (tmin + tmax)/2. */
  temp: number;
  tmin: number | null;
  tmax: number | null;
  updated_at: string;
  /** How a day without an observation was filled: 'interpolation' or 'second-station'; null for an observed day. */
  fill_method: FillMethod | null;
  /** What a filled day was filled from (neighbours, or the station and fitted line with its RMSE); null for an observed day. */
  fill_note: string | null;
}

export type { FillMethod };

export interface FacilitiesTable {
  id: string;
  organisation_id: string;
  name: string;
  address: string | null;
  floor_area: number | null;
  created_at: string;
}

export interface MetersTable {
  id: string;
  organisation_id: string;
  facility_id: string;
  name: string;
  fuel: string;
  unit: string;
  weather_station_id: string;
  created_at: string;
}

export interface ReadingsTable {
  meter_id: string;
  period_start: string;
  period_end: string;
  quantity: number;
  /** 0 or 1. */
  estimated: number;
  cost: number | null;
  created_at: string;
  updated_at: string;
}

export type BaselineStatus = 'draft' | 'frozen' | 'superseded';

export interface BaselinesTable {
  id: string;
  organisation_id: string;
  meter_id: string;
  version: number;
  period_start: string;
  period_end: string;
  status: BaselineStatus;
  /** The fit options used, JSON. */
  options_json: string;
  /** The engine's fit document (all candidates with verdicts), JSON. */
  document_json: string;
  /** The fitted models by shape (what savings projects with), JSON. */
  fits_json: string;
  /** The exact inputs: readings and daily weather of the window, JSON. */
  inputs_json: string;
  selected_model: string;
  chosen_model: string;
  choice_reason: string | null;
  content_hash: string | null;
  note: string | null;
  frozen_at: string | null;
  frozen_by: string | null;
  supersedes_id: string | null;
  supersede_reason: string | null;
  created_at: string;
  created_by: string;
  /** How the fit saw each reading's weather: 'daily' (day-resolved) or 'mean'; 'mean' for every baseline stored before the form existed. */
  temperature_form: 'daily' | 'mean';
  /** The reason given at freeze for projecting from a baseline shorter than a full cycle of seasons; null when none was needed or given. */
  short_baseline_override: string | null;
  /** The reason given at freeze for projecting beyond the extrapolation limit; null when none was given. */
  extrapolation_override: string | null;
}

/** One hash chain per organisation: (organisation_id, seq) is the key. */
export interface AuditLogTable {
  organisation_id: string;
  seq: number;
  /** API key id, or "system". */
  actor: string;
  at: string;
  action: string;
  entity_type: string;
  entity_id: string;
  before_json: string | null;
  after_json: string | null;
  prev_hash: string;
  hash: string;
}

export interface IdempotencyKeysTable {
  organisation_id: string;
  key: string;
  request_hash: string;
  /** Null while the first request is still in flight. */
  status_code: number | null;
  response_body: string | null;
  content_type: string | null;
  created_at: string;
  /** The process serving the first request, `host/pid/start` (src/lib/process-holder.ts); null on rows from before 0009. */
  holder: string | null;
}

/** A non-routine adjustment: added to the adjusted baseline of the reporting days it covers. */
export interface AdjustmentsTable {
  id: string;
  organisation_id: string;
  meter_id: string;
  period_start: string;
  period_end: string;
  /** A total spread evenly over [period_start, period_end), or null when per_day is given. */
  quantity: number | null;
  per_day: number | null;
  reason: string;
  created_at: string;
  created_by: string;
  /** Set when the adjustment was withdrawn (it then counts nowhere, but stays on record). */
  withdrawn_at: string | null;
  withdrawn_by: string | null;
  withdraw_reason: string | null;
  /** The engineer's standard uncertainty (one standard deviation) of the adjustment's total, in the meter's unit; null when none was stated. */
  uncertainty: number | null;
}

/** One entry of a meter's contract rate schedule (currency per unit of the meter). */
export interface RatesTable {
  meter_id: string;
  effective_from: string;
  /** Exclusive; null for the open-ended last entry. */
  effective_to: string | null;
  price: number;
  /** Yearly escalation as a fraction, applied on each anniversary of effective_from. */
  escalation: number;
  currency: string;
  updated_at: string;
}

/** A facility's performance contract: its years and guaranteed savings (JSON list per year). */
export interface ContractsTable {
  facility_id: string;
  organisation_id: string;
  contract_start: string;
  years: number;
  currency: string | null;
  energy_unit: string;
  guarantees_json: string;
  updated_at: string;
  /** The contract's own reference (number or title); null when not given. */
  reference: string | null;
  /** The parties, JSON list of { role, name }. */
  parties_json: string;
  /** The M&V plan's reference and its IPMVP option (A, B, C or D); null when not given. */
  mv_plan_reference: string | null;
  mv_option: string | null;
  /** The two-sided confidence level that governs every ± of the contract's reports (0.9 unless set). */
  confidence: number;
}

/** A station's normal (long-term typical) year: 365 daily means, JSON, with its content hash. */
export interface NormalYearsTable {
  station_id: string;
  source: string;
  temps_json: string;
  content_hash: string;
  updated_at: string;
}

export type StatementStatus = 'prepared' | 'approved' | 'rejected' | 'voided';

/** An issued savings statement: the request, the data it rests on, and its workflow. Its bytes are in statement_copies. */
export interface StatementsTable {
  id: string;
  organisation_id: string;
  status: StatementStatus;
  /** The request as given (window, facilityId, confidence), canonical JSON: what compare renders again. */
  request_json: string;
  window_from: string;
  window_to: string;
  window_kind: string;
  window_label: string;
  facility_id: string | null;
  confidence: number;
  note: string | null;
  /** The organisation's audit head when the statement was rendered. */
  audit_seq: number;
  audit_hash: string;
  /** The content hash of the savings report inside the statement. */
  report_hash: string;
  /** Last day (inclusive) of the latest reporting reading counted; null when none. */
  data_through: string | null;
  prepared_by: string;
  prepared_at: string;
  approved_by: string | null;
  approved_at: string | null;
  rejected_by: string | null;
  rejected_at: string | null;
  rejection_reason: string | null;
  voided_by: string | null;
  voided_at: string | null;
  void_reason: string | null;
  replaced_by: string | null;
}

export type StatementCopyKind = 'issued' | 'approved' | 'rejected' | 'voided';

/** One stored copy of a statement (1: as issued; then one per workflow step), in every format, never updated. */
export interface StatementCopiesTable {
  statement_id: string;
  copy: number;
  organisation_id: string;
  kind: StatementCopyKind;
  created_at: string;
  json_body: string;
  csv_body: string;
  html_body: string;
  json_hash: string;
  csv_hash: string;
  html_hash: string;
}

/** A meter's data version: a random token replaced by every write that can change the meter's savings (src/store/data-versions.ts). */
export interface MeterDataVersionsTable {
  meter_id: string;
  version: string;
}

/** A frozen baseline's model in the compact form projections read, derived from its content (src/services/frozen-models.ts). */
export interface FrozenModelsTable {
  baseline_id: string;
  /** The content hash it was derived from. */
  content_hash: string;
  format: number;
  model_json: string;
  /** SHA-256 of the content hash, the format and model_json. */
  model_hash: string;
}

/** A named independent variable of a facility (meter_id null) or of one of its meters. */
export interface VariablesTable {
  id: string;
  organisation_id: string;
  facility_id: string;
  meter_id: string | null;
  name: string;
  unit: string;
  /** 'daily' | 'per-period'. */
  kind: string;
  /** 'mean' | 'total'. */
  aggregation: string;
  created_at: string;
  created_by: string;
}

/** One value of a variable over [period_start, period_end). */
export interface VariableValuesTable {
  variable_id: string;
  period_start: string;
  period_end: string;
  value: number;
  updated_at: string;
}

/** A facility's calendar (day types, weekly pattern, dated exceptions) as one JSON document. */
export interface FacilityCalendarsTable {
  facility_id: string;
  organisation_id: string;
  calendar_json: string;
  updated_at: string;
  updated_by: string;
}

/** A signed audit head (migrations/0010_audit_checkpoints.ts). */
export interface AuditCheckpointsTable {
  organisation_id: string;
  seq: number;
  head_hash: string;
  signed_at: string;
  key_id: string;
  signature: string;
  reason: 'interval' | 'statement' | 'request';
}

export interface Database {
  organisations: OrganisationsTable;
  api_keys: ApiKeysTable;
  weather_stations: WeatherStationsTable;
  weather_observations: WeatherObservationsTable;
  facilities: FacilitiesTable;
  meters: MetersTable;
  readings: ReadingsTable;
  baselines: BaselinesTable;
  audit_log: AuditLogTable;
  idempotency_keys: IdempotencyKeysTable;
  adjustments: AdjustmentsTable;
  rates: RatesTable;
  contracts: ContractsTable;
  normal_years: NormalYearsTable;
  statements: StatementsTable;
  statement_copies: StatementCopiesTable;
  meter_data_versions: MeterDataVersionsTable;
  variables: VariablesTable;
  variable_values: VariableValuesTable;
  facility_calendars: FacilityCalendarsTable;
  audit_checkpoints: AuditCheckpointsTable;
  frozen_models: FrozenModelsTable;
}

export type VariableRow = Selectable<VariablesTable>;
export type FrozenModelRow = Selectable<FrozenModelsTable>;

export type ReadingRow = Selectable<ReadingsTable>;
export type NewReadingRow = Insertable<ReadingsTable>;
export type BaselineRow = Selectable<BaselinesTable>;
export type BaselineUpdate = Updateable<BaselinesTable>;
export type MeterRow = Selectable<MetersTable>;
export type ApiKeyRow = Selectable<ApiKeysTable>;
export type AuditRow = Selectable<AuditLogTable>;
export type StatementRow = Selectable<StatementsTable>;
export type StatementCopyRow = Selectable<StatementCopiesTable>;
