/**
 * What a service function needs to act: the store, who is acting, and the
 * time. Services hold the ledger's rules (ownership, conflicts, frozen
 * baselines) and call the engine; routes only translate HTTP to these calls.
 */
import type { Transaction } from 'kysely';
import type { Store } from '../store/connect.js';
import { writeTransaction } from '../store/transactions.js';
import type { Database } from '../store/schema.js';
import type { Principal } from '../domain/principal.js';
import { appendAudit, type AuditEntry } from '../store/audit.js';
import type { CheckpointSigner } from '../lib/checkpoint-signature.js';

export interface ServiceContext {
  store: Store;
  principal: Principal;
  /** ISO-8601 time of the request. */
  now: string;
  /** Signs audit checkpoints (an issued statement carries one); absent when the service holds no checkpoint key. */
  checkpointSigner?: CheckpointSigner | undefined;
}

export type Tx = Transaction<Database>;
export type { Executor } from '../store/executor.js';

/**
 * Run `work` in one transaction: every write in it, audit rows included,
 * lands or none does; writes of one organisation are serialised across
 * instances (see writeTransaction).
 */
export function inTransaction<T>(ctx: ServiceContext, work: (trx: Tx) => Promise<T>): Promise<T> {
  return writeTransaction(ctx.store.db, ctx.principal.organisationId, work);
}

/** Append the audit row for a write made by this context's principal. */
export function audit(
  trx: Tx,
  ctx: ServiceContext,
  entry: Pick<AuditEntry, 'action' | 'entityType' | 'entityId' | 'before' | 'after'>,
): Promise<unknown> {
  return appendAudit(trx, {
    ...entry,
    organisationId: ctx.principal.organisationId,
    actor: ctx.principal.keyId,
    at: ctx.now,
  });
}
