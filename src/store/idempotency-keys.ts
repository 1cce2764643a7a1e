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
export async function reserveIdempotencyKey(
  db: Kysely<Database>,
  id: IdempotencyKeyId,
  requestHash: string,
  at: string,
  holder: string,
): Promise<boolean> {
  const inserted = await db
    .insertInto('idempotency_keys')
    .values({
      ...byId(id),
      request_hash: requestHash,
      status_code: null,
      response_body: null,
      content_type: null,
      created_at: at,
      holder,
    })
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

/**
 * Takes over a key whose first request died in flight: it is in flight again
 * from `at`, held by `holder`. Only while it is still in flight under the
 * holder that was seen (`seenHolder`, `seenAt`): false when another retry
 * took it over first (nothing is changed then).
 */
export async function renewIdempotencyKey(
  db: Kysely<Database>,
  id: IdempotencyKeyId,
  seen: { holder: string | null; createdAt: string },
  at: string,
  holder: string,
): Promise<boolean> {
  const updated = await db
    .updateTable('idempotency_keys')
    .set({ created_at: at, holder })
    .where('organisation_id', '=', id.organisationId)
    .where('key', '=', id.key)
    .where('status_code', 'is', null)
    .where('created_at', '=', seen.createdAt)
    .where((eb) => (seen.holder === null ? eb('holder', 'is', null) : eb('holder', '=', seen.holder)))
    .executeTakeFirst();
  return Number(updated.numUpdatedRows) === 1;
}

/**
 * At start: frees every key still in flight under a holder `isGone` says is
 * gone (a process of this host that died mid-request), so a retry is served
 * at once. Returns how many were freed.
 */
export async function releaseKeysOfGoneHolders(
  db: Kysely<Database>,
  isGone: (holder: string) => boolean,
): Promise<number> {
  const holders = await db
    .selectFrom('idempotency_keys')
    .select('holder')
    .distinct()
    .where('status_code', 'is', null)
    .where('holder', 'is not', null)
    .execute();
  let freed = 0;
  for (const { holder } of holders) {
    if (holder === null || !isGone(holder)) continue;
    const deleted = await db
      .deleteFrom('idempotency_keys')
      .where('holder', '=', holder)
      .where('status_code', 'is', null)
      .executeTakeFirst();
    freed += Number(deleted.numDeletedRows);
  }
  return freed;
}

/** Keeps the key's answer for replay. */
export async function recordIdempotentAnswer(
  db: Kysely<Database>,
  id: IdempotencyKeyId,
  answer: StoredAnswer,
): Promise<void> {
  await db
    .updateTable('idempotency_keys')
    .set({ status_code: answer.statusCode, response_body: answer.body, content_type: answer.contentType })
    .where('organisation_id', '=', id.organisationId)
    .where('key', '=', id.key)
    .execute();
}

/** Frees the key: its request failed, so nothing was stored and the key may be used again. */
export async function releaseIdempotencyKey(db: Kysely<Database>, id: IdempotencyKeyId): Promise<void> {
  await db
    .deleteFrom('idempotency_keys')
    .where('organisation_id', '=', id.organisationId)
    .where('key', '=', id.key)
    .execute();
}
