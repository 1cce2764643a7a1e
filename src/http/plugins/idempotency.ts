/**
 * Idempotency-Key on writes: the first successful response is kept and a
 * replay with the same key and the same request gets it back (with
 * `Idempotent-Replayed: true`); the same key with a different request is
 * refused. Keys are scoped to the organisation. A failed request frees its
 * key, since nothing was stored. A key whose first request died in flight is
 * freed after STALE_AFTER_MS, or at once when its holder (the process that
 * served it, `host/pid/start`) is known to be gone: a process of this host
 * that died mid-request.
 */
import type { FastifyRequest } from 'fastify';
import fp from 'fastify-plugin';
import type { Store } from '../../store/connect.js';
import {
  findIdempotencyKey,
  recordIdempotentAnswer,
  releaseIdempotencyKey,
  renewIdempotencyKey,
  reserveIdempotencyKey,
} from '../../store/idempotency-keys.js';
import { canonicalJson, sha256Hex } from '../../lib/canonical-json.js';
import { holderIsGone, thisHolder } from '../../lib/process-holder.js';
import { Problem } from '../problem.js';
import { databaseFault, faultRecord } from '../../store/faults.js';
import { FASTIFY_VERSION, PLUGIN } from './names.js';

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
      throw new Problem('validation', 'the body is nested too deeply', [
        { field: '(body)', message: 'nested too deeply' },
      ]);
    throw error;
  }
  return sha256Hex(`${request.method} ${path} ${canonical}`);
}

export interface IdempotencyOptions {
  store: Store;
  /** The current time as ISO-8601. */
  now: () => string;
  /** This process as the holder of the keys it reserves (default: src/lib/process-holder.ts). */
  holder?: string;
  /** Whether a key's holder is certainly gone (default: a dead process of this host). */
  isGone?: (holder: string) => boolean;
}

/** Reserves the key before a write's handler runs, replays a finished one, and keeps (or frees) the key as the write answers. */
export const idempotencyPlugin = fp<IdempotencyOptions>(
  async (app, { store, now, holder = thisHolder(), isGone = holderIsGone }) => {
    app.addHook('preHandler', async (request, reply) => {
      const header = request.headers[IDEMPOTENCY_HEADER];
      if (header === undefined || !['POST', 'PUT', 'DELETE'].includes(request.method) || !request.principal) return;
      const key = Array.isArray(header) ? header[0]! : header;
      if (!KEY_PATTERN.test(key)) {
        throw new Problem('validation', 'Idempotency-Key must be 1 to 200 visible ASCII characters', [
          { field: 'header.idempotency-key', message: 'invalid' },
        ]);
      }
      const id = { organisationId: request.principal.organisationId, key };
      const hash = requestHash(request);
      if (await reserveIdempotencyKey(store.db, id, hash, now(), holder)) {
        request.idempotency = id;
        return;
      }
      const existing = await findIdempotencyKey(store.db, id);
      if (!existing) throw new Problem('idempotency-in-flight', 'retry the request');
      if (existing.request_hash !== hash) {
        throw new Problem(
          'idempotency-mismatch',
          'this Idempotency-Key was first used with a different request; use a new key for a new request',
        );
      }
      if (existing.status_code === null) {
        const age = Date.parse(now()) - Date.parse(existing.created_at);
        const gone = existing.holder !== null && existing.holder !== holder && isGone(existing.holder);
        const takenOver =
          (gone || age >= STALE_AFTER_MS) &&
          (await renewIdempotencyKey(
            store.db,
            id,
            { holder: existing.holder, createdAt: existing.created_at },
            now(),
            holder,
          ));
        if (!takenOver)
          throw new Problem('idempotency-in-flight', 'the first request with this key has not finished; retry shortly');
        request.idempotency = id;
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
      try {
        if (
          reply.statusCode >= 200 &&
          reply.statusCode < 300 &&
          (typeof payload === 'string' || Buffer.isBuffer(payload))
        ) {
          await recordIdempotentAnswer(store.db, pending, {
            statusCode: reply.statusCode,
            body: payload.toString(),
            contentType: String(reply.getHeader('content-type') ?? ''),
          });
        } else {
          await releaseIdempotencyKey(store.db, pending);
        }
      } catch (error) {
        // The answer stands: a write already committed is not undone by losing its key's record. The key
        // stays in flight and is freed after STALE_AFTER_MS; a replay before then is told to retry.
        if (databaseFault(error) === null) throw error;
        request.log.warn(
          { database: faultRecord(error) },
          'idempotency key not recorded: the database is not available',
        );
      }
      return payload;
    });
  },
  // Keys belong to the authenticated caller's organisation; the refusals are problems.
  { name: PLUGIN.idempotency, fastify: FASTIFY_VERSION, dependencies: [PLUGIN.problems, PLUGIN.auth] },
);
