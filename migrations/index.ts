/**
 * Every migration, by name, in order. Listed statically (not read from the
 * folder) so the same list works from TypeScript sources and from dist/.
 */
import type { Migration } from 'kysely';
import * as ledger0001 from './0001_ledger.js';
import * as oneFrozen0002 from './0002_one_frozen_baseline.js';
import * as contracts0003 from './0003_contracts_and_costs.js';
import * as baselineForm0004 from './0004_baseline_form_and_overrides.js';
import * as statements0005 from './0005_statements.js';
import * as variables0006 from './0006_independent_variables.js';
import * as weatherFills0007 from './0007_weather_fills.js';
import * as meterDataVersions0008 from './0008_meter_data_versions.js';
import * as idempotencyHolder0009 from './0009_idempotency_holder.js';
import * as auditCheckpoints0010 from './0010_audit_checkpoints.js';
import * as frozenModels0011 from './0011_frozen_models.js';

export const migrations: Record<string, Migration> = {
  '0001_ledger': ledger0001,
  '0002_one_frozen_baseline': oneFrozen0002,
  '0003_contracts_and_costs': contracts0003,
  '0004_baseline_form_and_overrides': baselineForm0004,
  '0005_statements': statements0005,
  '0006_independent_variables': variables0006,
  '0007_weather_fills': weatherFills0007,
  '0008_meter_data_versions': meterDataVersions0008,
  '0009_idempotency_holder': idempotencyHolder0009,
  '0010_audit_checkpoints': auditCheckpoints0010,
  '0011_frozen_models': frozenModels0011,
};
