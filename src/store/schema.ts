/**
 * The database as kysely sees it: one interface per table. Column types are
 * kept dialect-neutral (text, integer, double precision): booleans are 0/1
 * integers, timestamps ISO-8601 text, JSON documents text.
 */
import type { Insertable, Selectable, Updateable } from 'kysely';
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
}

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
}

/** A station's normal (long-term typical) year: 365 daily means, JSON, with its content hash. */
export interface NormalYearsTable {
  station_id: string;
  source: string;
  temps_json: string;
  content_hash: string;
  updated_at: string;
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
}

export type ReadingRow = Selectable<ReadingsTable>;
export type NewReadingRow = Insertable<ReadingsTable>;
export type BaselineRow = Selectable<BaselinesTable>;
export type BaselineUpdate = Updateable<BaselinesTable>;
export type MeterRow = Selectable<MetersTable>;
export type ApiKeyRow = Selectable<ApiKeysTable>;
export type AuditRow = Selectable<AuditLogTable>;
