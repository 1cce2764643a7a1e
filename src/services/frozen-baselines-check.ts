/**
 * A frozen baseline's content against the hash its freeze recorded. The
 * stored content hash alone proves nothing to an outsider: whoever can edit
 * the fit can recompute it. The freeze's audit row, chained to every row
 * after it, holds the hash as it was when the baseline was frozen; a
 * baseline is intact when its stored content still gives its hash and that
 * hash is the one the freeze row recorded. Its stored compact model
 * (frozen_models), derived bookkeeping, must be the model its intact
 * content gives.
 */
import { baselineContentHash, verifyBaselineContent } from '../store/baseline-content.js';
import { fixedBaselineRows, freezeRowsOf } from '../store/organisation-tables.js';
import type { BaselineRow, FrozenModelRow } from '../store/schema.js';
import { deriveFrozenModel, STORED_MODEL_FORMAT, storedModelHash, storedModelRow } from './frozen-models.js';
import type { Executor } from './context.js';
import type { StateDifference } from './audit-replay.js';

export interface FrozenBaselinesVerdict {
  ok: boolean;
  /** Frozen and superseded baselines checked. */
  checked: number;
  differences: StateDifference[];
}

/** Why a frozen baseline's content hash cannot be trusted, or null when it can. */
function baselineFault(
  row: Parameters<typeof verifyBaselineContent>[0] & { id: string },
  recordedHash: string | undefined,
): string | null {
  if (recordedHash === undefined) return 'no freeze row on the audit trail records its content hash';
  if (!verifyBaselineContent(row)) {
    let computed = 'unreadable';
    try {
      computed = baselineContentHash(row);
    } catch {
      // a column that no longer parses: the content was edited
    }
    return `its stored content gives hash ${computed}, not its stored content hash ${row.content_hash ?? 'none'}`;
  }
  if (row.content_hash !== recordedHash)
    return `its content hash ${row.content_hash ?? 'none'} is not the hash ${recordedHash} recorded when it was frozen (the content was edited and the hash recomputed)`;
  return null;
}

/**
 * Why a baseline's stored compact model cannot stand, or null when it can:
 * one the reports would use (current format, its content hash, its own hash
 * intact) must be exactly the model derived again from the content; one they
 * would pass over must still not have been edited under its hash.
 */
function storedModelFault(row: BaselineRow, stored: FrozenModelRow): string | null {
  if (stored.content_hash !== row.content_hash || stored.format !== STORED_MODEL_FORMAT) return null; // never read
  let expected: FrozenModelRow;
  try {
    expected = storedModelRow(row.id, row.content_hash, deriveFrozenModel(row, row.content_hash));
  } catch (error) {
    return `its content gives no model to compare the stored one with: ${(error as Error).message}`;
  }
  if (stored.model_json === expected.model_json && stored.model_hash === expected.model_hash) return null;
  if (stored.model_json === expected.model_json)
    return "its stored model's hash was edited (reports derive the model from the content instead)";
  if (stored.model_hash === storedModelHash(stored.content_hash, stored.format, stored.model_json))
    return 'its stored model is not the model its content gives, and its hash was recomputed to match: reports project with it';
  return 'its stored model was edited (it no longer matches its own hash, so reports derive the model from the content instead)';
}

/** Check every frozen and superseded baseline of the organisation against its freeze row, and its stored model against its content. */
export async function checkFrozenBaselines(db: Executor, organisationId: string): Promise<FrozenBaselinesVerdict> {
  const [rows, freezes, models] = await Promise.all([
    fixedBaselineRows(db, organisationId),
    freezeRowsOf(db, organisationId),
    storedModelsOf(db, organisationId),
  ]);
  const differences: StateDifference[] = [];
  for (const row of rows) {
    const freeze = freezes.get(row.id);
    const recorded = freeze?.after_json
      ? (JSON.parse(freeze.after_json) as { contentHash?: string }).contentHash
      : undefined;
    const fault = baselineFault(row, recorded);
    if (fault !== null) differences.push({ table: 'baselines', key: `baseline ${row.id}`, difference: fault });
    const stored = models.get(row.id);
    // A stored model is only checked against content that still gives its hash.
    const intact = fault === null || verifyBaselineContent(row);
    const modelFault = stored && intact ? storedModelFault(row as BaselineRow, stored) : null;
    if (modelFault !== null)
      differences.push({ table: 'frozen_models', key: `baseline ${row.id}`, difference: modelFault });
  }
  return { ok: differences.length === 0, checked: rows.length, differences };
}

async function storedModelsOf(db: Executor, organisationId: string): Promise<Map<string, FrozenModelRow>> {
  const rows = await db
    .selectFrom('frozen_models')
    .selectAll()
    .where('baseline_id', 'in', db.selectFrom('baselines').select('id').where('organisation_id', '=', organisationId))
    .execute();
  return new Map(rows.map((r) => [r.baseline_id, r]));
}
