/**
 * A frozen baseline's content against the hash its freeze recorded. The
 * stored content hash alone proves nothing to an outsider: whoever can edit
 * the fit can recompute it. The freeze's audit row, chained to every row
 * after it, holds the hash as it was when the baseline was frozen; a
 * baseline is intact when its stored content still gives its hash and that
 * hash is the one the freeze row recorded.
 */
import { baselineContentHash, verifyBaselineContent } from '../store/baseline-content.js';
import { fixedBaselineRows, freezeRowsOf } from '../store/organisation-tables.js';
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

/** Check every frozen and superseded baseline of the organisation against its freeze row. */
export async function checkFrozenBaselines(db: Executor, organisationId: string): Promise<FrozenBaselinesVerdict> {
  const [rows, freezes] = await Promise.all([fixedBaselineRows(db, organisationId), freezeRowsOf(db, organisationId)]);
  const differences: StateDifference[] = [];
  for (const row of rows) {
    const freeze = freezes.get(row.id);
    const recorded = freeze?.after_json
      ? (JSON.parse(freeze.after_json) as { contentHash?: string }).contentHash
      : undefined;
    const fault = baselineFault(row, recorded);
    if (fault !== null) differences.push({ table: 'baselines', key: `baseline ${row.id}`, difference: fault });
  }
  return { ok: differences.length === 0, checked: rows.length, differences };
}
