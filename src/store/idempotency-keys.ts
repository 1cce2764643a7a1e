/**
 * The idempotency_keys table: one row per (organisation, key) a write was
 * sent with, holding the request's hash and, once the write answered 2xx, the
 * answer to replay. The rules (what counts as the same request, when a key in
 * flight is stale) live in the HTTP plugin that calls these.
 */
import type { Kysely, Selectable } from 'kysely';
import type { Database, IdempotencyKeysTable } from './schema.js';

/** A key as stored; `status_code` is null while its first request is in flight. */
export type IdempotencyKeyRow = Selectable<IdempotencyKeysTable>;

/** Which key: keys are scoped to the organisation. */
export interface IdempotencyKeyId {
  organisationId: string;
  key: string;
}

/** The answer kept for replay. */
export interface StoredAnswer {
  statusCode: number;
  body: string;
  contentType: string;
}

const byId = (id: IdempotencyKeyId) => ({ organisation_id: id.organisationId, key: id.key });

/** Records the key as in flight; false when the organisation already has it (nothing is changed then). */
export async function reserveIdempotencyKey(db: Kysely<Database>, id: IdempotencyKeyId, requestHash: string, at: string): Promise<boolean> {
  const inserted = await db
    .insertInto('idempotency_keys')
    .values({ ...byId(id), request_hash: requestHash, status_code: null, response_body: null, content_type: null, created_at: at })
    .onConflict((oc) => oc.columns(['organisation_id', 'key']).doNothing())
    .executeTakeFirst();
  return Number(inserted.numInsertedOrUpdatedRows ?? 0n) === 1;
}

/** The stored key, if the organisation has it. */
export function findIdempotencyKey(db: Kysely<Database>, id: IdempotencyKeyId): Promise<IdempotencyKeyRow | undefined> {
  return db
    .selectFrom('idempotency_keys')
    .selectAll()
    .where('organisation_id', '=', id.organisationId)
    .where('key', '=', id.key)
    .executeTakeFirst();
}

/** Takes over a key whose first request died in flight: it is in flight again from `at`. */
export async function renewIdempotencyKey(db: Kysely<Database>, id: IdempotencyKeyId, at: string): Promise<void> {
  await db
    .updateTable('idempotency_keys')
    .set({ created_at: at })
    .where('organisation_id', '=', id.organisationId)
    .where('key', '=', id.key)
    .execute();
}

/** Keeps the key's answer for replay. */
export async function recordIdempotentAnswer(db: Kysely<Database>, id: IdempotencyKeyId, answer: StoredAnswer): Promise<void> {
  await db
    .updateTable('idempotency_keys')
    .set({ status_code: answer.statusCode, response_body: answer.body, content_type: answer.contentType })
    .where('organisation_id', '=', id.organisationId)
    .where('key', '=', id.key)
    .execute();
}

/** Frees the key: its request failed, so nothing was stored and the key may be used again. */
export async function releaseIdempotencyKey(db: Kysely<Database>, id: IdempotencyKeyId): Promise<void> {
  await db.deleteFrom('idempotency_keys').where('organisation_id', '=', id.organisationId).where('key', '=', id.key).execute();
}
