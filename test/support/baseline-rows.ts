/**
 * A bare baseline row written straight to the table, for tests of the rules
 * around baselines (frozen windows, the one-frozen-per-meter index) where the
 * baselines API itself is not under test. Its JSON columns are empty.
 */
import type { Kysely } from 'kysely';
import type { BaselineRow, BaselineStatus, Database } from '../../src/store/schema.js';

export interface BareBaseline {
  id: string;
  organisationId: string;
  meterId: string;
  start: string;
  end: string;
  status: BaselineStatus;
  version?: number;
  model?: string;
  at?: string;
}

export function bareBaselineRow(b: BareBaseline): BaselineRow {
  const at = b.at ?? '2026-01-01T00:00:00.000Z';
  const sealed = b.status !== 'draft';
  return {
    id: b.id,
    organisation_id: b.organisationId,
    meter_id: b.meterId,
    version: b.version ?? 1,
    period_start: b.start,
    period_end: b.end,
    status: b.status,
    options_json: '{}',
    document_json: '{}',
    fits_json: '{}',
    inputs_json: '{}',
    selected_model: b.model ?? '3PH',
    chosen_model: b.model ?? '3PH',
    choice_reason: null,
    content_hash: null,
    note: null,
    frozen_at: sealed ? at : null,
    frozen_by: sealed ? 'test' : null,
    supersedes_id: null,
    supersede_reason: null,
    created_at: at,
    created_by: 'test',
    temperature_form: 'mean',
    short_baseline_override: null,
    extrapolation_override: null,
  };
}

export async function insertBareBaseline(db: Kysely<Database>, b: BareBaseline): Promise<void> {
  await db.insertInto('baselines').values(bareBaselineRow(b)).execute();
}
