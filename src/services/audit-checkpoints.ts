/**
 * Signing the audit head: periodically, on every issued statement, and when
 * an administrator asks. A checkpoint is signed only when the head has moved
 * since the key's last one, so an idle organisation gathers no rows.
 */
import { DomainError } from '../domain/errors.js';
import type { CheckpointSigner } from '../lib/checkpoint-signature.js';
import {
  auditHead,
  insertCheckpoint,
  latestCheckpoint,
  listCheckpoints,
  type CheckpointReason,
  type StoredCheckpoint,
} from '../store/audit-checkpoints.js';
import type { Executor } from './context.js';
import { decodeCursor, encodeCursor, type PageInfo } from './paging.js';

/**
 * Sign the organisation's current head with `signer`, unless the key has
 * signed it (or a later row) already; returns the checkpoint that covers the
 * head, or undefined for an organisation with no rows. Call it inside the
 * write transaction that should be covered, or after it.
 */
export async function signAuditHead(
  db: Executor,
  signer: CheckpointSigner,
  organisationId: string,
  signedAt: string,
  reason: CheckpointReason,
): Promise<StoredCheckpoint | undefined> {
  const head = await auditHead(db, organisationId);
  if (!head) return undefined;
  const last = await latestCheckpoint(db, organisationId, signer.keyId);
  if (last && last.seq >= head.seq) return last;
  const checkpoint: StoredCheckpoint = {
    ...signer.sign({ organisationId, seq: head.seq, headHash: head.hash, signedAt }),
    reason,
  };
  await insertCheckpoint(db, checkpoint);
  return checkpoint;
}

/** The periodic signer's round: every organisation whose head moved. Returns how many were signed. */
export async function signEveryAuditHead(db: Executor, signer: CheckpointSigner, signedAt: string): Promise<number> {
  const organisations = await db.selectFrom('organisations').select('id').orderBy('id').execute();
  let signed = 0;
  for (const { id } of organisations) {
    const before = await latestCheckpoint(db, id, signer.keyId);
    const after = await signAuditHead(db, signer, id, signedAt, 'interval');
    if (after && after.seq !== before?.seq) signed++;
  }
  return signed;
}

/** The signed head an administrator asks for; refused when the service holds no checkpoint key. */
export async function requestCheckpoint(
  db: Executor,
  signer: CheckpointSigner | undefined,
  organisationId: string,
  signedAt: string,
): Promise<StoredCheckpoint> {
  if (!signer) throw noKey();
  const checkpoint = await signAuditHead(db, signer, organisationId, signedAt, 'request');
  if (!checkpoint) throw new DomainError('unprocessable', 'the organisation has no audit rows to sign');
  return checkpoint;
}

function noKey(): DomainError {
  return new DomainError(
    'unprocessable',
    'this service signs no checkpoints: its operator has not configured a checkpoint key (MVLEDGER_CHECKPOINT_KEY_FILE)',
  );
}

export interface CheckpointPage extends PageInfo {
  /** The public key (PEM) the service signs with now, and its id; null when it signs none. */
  publicKey: { keyId: string; pem: string } | null;
  checkpoints: StoredCheckpoint[];
}

/** The organisation's checkpoints, oldest first, a page at a time. */
export async function listAuditCheckpoints(
  db: Executor,
  signer: CheckpointSigner | undefined,
  organisationId: string,
  page: { limit: number; cursor?: string },
): Promise<CheckpointPage> {
  const afterSeq = (decodeCursor('checkpoints', page.cursor, 'n')?.[0] as number | undefined) ?? 0;
  const rows = await listCheckpoints(db, organisationId, page.limit + 1, afterSeq);
  const checkpoints = rows.slice(0, page.limit);
  const last = checkpoints[checkpoints.length - 1];
  const more = rows.length > page.limit && last !== undefined;
  return {
    publicKey: signer ? { keyId: signer.keyId, pem: signer.publicKeyPem } : null,
    checkpoints,
    limit: page.limit,
    nextCursor: more ? encodeCursor('checkpoints', [last.seq]) : null,
  };
}
