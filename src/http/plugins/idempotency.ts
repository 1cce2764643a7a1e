/**
 * Idempotency-Key on writes: the first successful response is kept and a
 * replay with the same key and the same request gets it back (with
 * `Idempotent-Replayed: true`); the same key with a different request is
 * refused. Keys are scoped to the organisation. A failed request frees its
 * key, since nothing was stored. A key whose first request died in flight is
 * freed after STALE_AFTER_MS.
 */
import type { FastifyInstance, FastifyRequest } from 'fastify';
import type { Store } from '../../store/connect.js';
import { canonicalJson, sha256Hex } from '../../lib/canonical-json.js';
import { Problem } from '../problem.js';
import { databaseFault, faultRecord } from '../../store/faults.js';

export const IDEMPOTENCY_HEADER = 'idempotency-key';
const STALE_AFTER_MS = 60_000;
const KEY_PATTERN = /^[\x21-\x7e]{1,200}$/;

declare module 'fastify' {
  interface FastifyRequest {
    idempotency?: { organisationId: string; key: string };
  }
}

function requestHash(request: FastifyRequest): string {
  const path = request.url.split('?')[0];
  let canonical: string;
  try {
    canonical = `${canonicalJson(request.query ?? {})}\n${canonicalJson(request.body ?? null)}`;
  } catch (error) {
    // A body no route schema looked at (a DELETE's) can nest deeper than the stack allows.
    if (error instanceof RangeError)
      throw new Problem('validation', 'the body is nested too deeply', [{ field: '(body)', message: 'nested too deeply' }]);
    throw error;
  }
  return sha256Hex(`${request.method} ${path} ${canonical}`);
}

export function installIdempotency(app: FastifyInstance, store: Store, now: () => string): void {
  app.addHook('preHandler', async (request, reply) => {
    const header = request.headers[IDEMPOTENCY_HEADER];
    if (header === undefined || !['POST', 'PUT', 'DELETE'].includes(request.method) || !request.principal) return;
    const key = Array.isArray(header) ? header[0]! : header;
    if (!KEY_PATTERN.test(key)) {
      throw new Problem('validation', 'Idempotency-Key must be 1 to 200 visible ASCII characters', [
        { field: 'header.idempotency-key', message: 'invalid' },
      ]);
    }
    const organisationId = request.principal.organisationId;
    const hash = requestHash(request);
    const db = store.db;
    const inserted = await db
      .insertInto('idempotency_keys')
      .values({
        organisation_id: organisationId,
        key,
        request_hash: hash,
        status_code: null,
        response_body: null,
        content_type: null,
        created_at: now(),
      })
      .onConflict((oc) => oc.columns(['organisation_id', 'key']).doNothing())
      .executeTakeFirst();
    if (Number(inserted.numInsertedOrUpdatedRows ?? 0n) === 1) {
      request.idempotency = { organisationId, key };
      return;
    }
    const existing = await db
      .selectFrom('idempotency_keys')
      .selectAll()
      .where('organisation_id', '=', organisationId)
      .where('key', '=', key)
      .executeTakeFirst();
    if (!existing) throw new Problem('idempotency-in-flight', 'retry the request');
    if (existing.request_hash !== hash) {
      throw new Problem(
        'idempotency-mismatch',
        'this Idempotency-Key was first used with a different request; use a new key for a new request',
      );
    }
    if (existing.status_code === null) {
      const age = Date.parse(now()) - Date.parse(existing.created_at);
      if (age < STALE_AFTER_MS)
        throw new Problem('idempotency-in-flight', 'the first request with this key has not finished; retry shortly');
      await db
        .updateTable('idempotency_keys')
        .set({ created_at: now() })
        .where('organisation_id', '=', organisationId)
        .where('key', '=', key)
        .execute();
      request.idempotency = { organisationId, key };
      return;
    }
    return reply
      .code(existing.status_code)
      .header('content-type', existing.content_type ?? 'application/json; charset=utf-8')
      .header('idempotent-replayed', 'true')
      .send(existing.response_body ?? '');
  });

  app.addHook('onSend', async (request, reply, payload) => {
    const pending = request.idempotency;
    if (!pending) return payload;
    request.idempotency = undefined;
    const where = store.db
      .updateTable('idempotency_keys')
      .where('organisation_id', '=', pending.organisationId)
      .where('key', '=', pending.key);
    try {
      if (reply.statusCode >= 200 && reply.statusCode < 300 && (typeof payload === 'string' || Buffer.isBuffer(payload))) {
        await where
          .set({
            status_code: reply.statusCode,
            response_body: payload.toString(),
            content_type: String(reply.getHeader('content-type') ?? ''),
          })
          .execute();
      } else {
        await store.db
          .deleteFrom('idempotency_keys')
          .where('organisation_id', '=', pending.organisationId)
          .where('key', '=', pending.key)
          .execute();
      }
    } catch (error) {
      // The answer stands: a write already committed is not undone by losing its key's record. The key
      // stays in flight and is freed after STALE_AFTER_MS; a replay before then is told to retry.
      if (databaseFault(error) === null) throw error;
      request.log.warn({ database: faultRecord(error) }, 'idempotency key not recorded: the database is not available');
    }
    return payload;
  });
}
