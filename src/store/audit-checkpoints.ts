/**
 * Signed audit checkpoints as stored: one row per signed head of an
 * organisation's chain (migrations/0010_audit_checkpoints.ts).
 */
import type { SignedCheckpoint } from '../lib/checkpoint-signature.js';
import type { AuditCheckpointsTable } from './schema.js';
import type { Executor } from './executor.js';

export type CheckpointReason = AuditCheckpointsTable['reason'];

export interface StoredCheckpoint extends SignedCheckpoint {
  reason: CheckpointReason;
}

function fromRow(row: AuditCheckpointsTable): StoredCheckpoint {
  return {
    organisationId: row.organisation_id,
    seq: row.seq,
    headHash: row.head_hash,
    signedAt: row.signed_at,
    keyId: row.key_id,
    signature: row.signature,
    reason: row.reason,
  };
}

export async function insertCheckpoint(db: Executor, checkpoint: StoredCheckpoint): Promise<void> {
  await db
    .insertInto('audit_checkpoints')
    .values({
      organisation_id: checkpoint.organisationId,
      seq: checkpoint.seq,
      head_hash: checkpoint.headHash,
      signed_at: checkpoint.signedAt,
      key_id: checkpoint.keyId,
      signature: checkpoint.signature,
      reason: checkpoint.reason,
    })
    .onConflict((oc) => oc.columns(['organisation_id', 'seq', 'key_id']).doNothing())
    .execute();
}

/** The organisation's latest checkpoint by this key, if any. */
export async function latestCheckpoint(
  db: Executor,
  organisationId: string,
  keyId: string,
): Promise<StoredCheckpoint | undefined> {
  const row = await db
    .selectFrom('audit_checkpoints')
    .selectAll()
    .where('organisation_id', '=', organisationId)
    .where('key_id', '=', keyId)
    .orderBy('seq', 'desc')
    .limit(1)
    .executeTakeFirst();
  return row ? fromRow(row) : undefined;
}

/** The organisation's checkpoints, oldest first, after `afterSeq`. */
export async function listCheckpoints(
  db: Executor,
  organisationId: string,
  limit: number,
  afterSeq = 0,
): Promise<StoredCheckpoint[]> {
  const rows = await db
    .selectFrom('audit_checkpoints')
    .selectAll()
    .where('organisation_id', '=', organisationId)
    .where('seq', '>', afterSeq)
    .orderBy('seq')
    .orderBy('key_id')
    .limit(limit)
    .execute();
  return rows.map(fromRow);
}

/** The head of the organisation's chain: its last row's sequence number and hash. */
export async function auditHead(
  db: Executor,
  organisationId: string,
): Promise<{ seq: number; hash: string } | undefined> {
  return db
    .selectFrom('audit_log')
    .select(['seq', 'hash'])
    .where('organisation_id', '=', organisationId)
    .orderBy('seq', 'desc')
    .limit(1)
    .executeTakeFirst();
}
