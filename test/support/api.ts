/**
 * A fresh service on an in-memory (or given) SQLite database, with one key per
 * role in organisation A and an admin key in organisation B, for API tests.
 * Requests go through fastify.inject (no sockets).
 */
import type { CheckpointSigner } from '../../src/lib/checkpoint-signature.js';
import type { FastifyInstance, InjectOptions } from 'fastify';
import { openStore, type Store } from '../../src/store/connect.js';
import { migrateToLatest } from '../../src/store/migrate.js';
import { buildApp } from '../../src/http/app.js';
import { createKey, createOrganisation } from '../../src/services/organisations.js';
import type { Role } from '../../src/domain/principal.js';
import { acquireTestDatabase, releaseTestDatabase } from './database.js';

export interface TestApi {
  app: FastifyInstance;
  store: Store;
  organisationId: string;
  otherOrganisationId: string;
  /** One live key per role in organisation A. */
  keys: Record<Role, string>;
  /** An admin key of organisation B. */
  otherKey: string;
  /** Send a request as `as` (a role of organisation A, 'other', 'none', or a raw token). */
  call(method: InjectOptions['method'], url: string, options?: CallOptions): Promise<ApiResponse>;
  close(): Promise<void>;
}

export interface CallOptions {
  as?: Role | 'other' | 'none' | { token: string };
  body?: unknown;
  /** Send the body as text/csv. */
  csv?: string;
  headers?: Record<string, string>;
}

export interface ApiResponse {
  status: number;
  headers: Record<string, unknown>;
  text: string;
  /** Parsed JSON body (undefined when not JSON). */
  json: any;
}

/**
 * A clock that moves forward a millisecond per call, so audit times are
 * distinct and ordered. Each clock counts on its own: test files share
 * modules in a worker (vitest.config.ts), and a file's times must not depend
 * on which files ran before it.
 */
export function steppingClock(start = Date.parse('2026-01-01T00:00:00.000Z')): () => string {
  let tick = 0;
  return () => new Date(start + tick++).toISOString();
}

/**
 * `databaseUrl` defaults to a fresh database of the project under test
 * (in-memory SQLite, or a migrated PostgreSQL schema that close() empties
 * for the next test service of this worker); a given URL is left in place on close.
 */
export async function makeTestApi(
  options: { databaseUrl?: string; now?: () => string; checkpointSigner?: CheckpointSigner } = {},
): Promise<TestApi> {
  const acquired =
    options.databaseUrl === undefined ? acquireTestDatabase() : { url: options.databaseUrl, migrated: false };
  const databaseUrl = acquired.url;
  const store = openStore(databaseUrl);
  if (!acquired.migrated) await migrateToLatest(store.db);
  const now = options.now ?? steppingClock();
  const org = await createOrganisation(store.db, 'Organisation A (test)', now());
  const other = await createOrganisation(store.db, 'Organisation B (test)', now());
  const keys = {} as Record<Role, string>;
  for (const role of ['admin', 'engineer', 'analyst', 'integration'] as const) {
    keys[role] = (await createKey(store.db, { organisationId: org.id, name: `${role} key`, role, at: now() })).token;
  }
  const otherKey = (
    await createKey(store.db, { organisationId: other.id, name: 'other admin', role: 'admin', at: now() })
  ).token;
  const app = await buildApp({ store, now, checkpointSigner: options.checkpointSigner });
  await app.ready();

  const call: TestApi['call'] = async (method, url, opts = {}) => {
    const as = opts.as ?? 'admin';
    const token = typeof as === 'object' ? as.token : as === 'none' ? null : as === 'other' ? otherKey : keys[as];
    const headers: Record<string, string> = { ...(token ? { authorization: `Bearer ${token}` } : {}), ...opts.headers };
    let payload: string | undefined;
    if (opts.csv !== undefined) {
      headers['content-type'] ??= 'text/csv';
      payload = opts.csv;
    } else if (opts.body !== undefined) {
      headers['content-type'] ??= 'application/json';
      payload = typeof opts.body === 'string' ? opts.body : JSON.stringify(opts.body);
    }
    const response = await app.inject({ method, url, headers, ...(payload !== undefined ? { payload } : {}) });
    let json: unknown;
    try {
      json = JSON.parse(response.body);
    } catch {
      json = undefined;
    }
    return { status: response.statusCode, headers: response.headers, text: response.body, json };
  };

  return {
    app,
    store,
    organisationId: org.id,
    otherOrganisationId: other.id,
    keys,
    otherKey,
    call,
    close: async () => {
      await app.close();
      await store.close();
      if (options.databaseUrl === undefined) await releaseTestDatabase(databaseUrl);
    },
  };
}
