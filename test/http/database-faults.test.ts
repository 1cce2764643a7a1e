/**
 * A database that is not available is answered 503 problem+json with
 * Retry-After, on every path a request takes to the database (the key
 * lookup, a route, readiness), and /readyz names the state of the database;
 * any other database error stays a 500 without internals. The store here is
 * a stand-in whose every query fails with the error under test. Check
 * values: RFC 9110 (503 and Retry-After), RFC 9457 (problem+json), and the
 * fault classes of src/store/faults.ts.
 */
import { afterEach, describe, expect, it } from 'vitest';
import type { FastifyInstance } from 'fastify';
import {
  Kysely,
  PostgresAdapter,
  PostgresIntrospector,
  PostgresQueryCompiler,
  type DatabaseConnection,
  type Driver,
} from 'kysely';
import { buildApp } from '../../src/http/app.js';
import type { Store } from '../../src/store/connect.js';
import type { Database } from '../../src/store/schema.js';

/** A store whose connections cannot be had: each attempt fails with `error()`. */
function failingStore(error: () => Error): Store {
  const driver: Driver = {
    init: async () => {},
    acquireConnection: async (): Promise<DatabaseConnection> => {
      throw error();
    },
    beginTransaction: async () => {},
    commitTransaction: async () => {},
    rollbackTransaction: async () => {},
    releaseConnection: async () => {},
    destroy: async () => {},
  };
  const db = new Kysely<Database>({
    dialect: {
      createAdapter: () => new PostgresAdapter(),
      createDriver: () => driver,
      createIntrospector: (k) => new PostgresIntrospector(k),
      createQueryCompiler: () => new PostgresQueryCompiler(),
    },
  });
  return { db, dialect: 'postgres', location: 'a stand-in that always fails', close: () => db.destroy() };
}

const withCode = (code: string, message: string) => Object.assign(new Error(message), { code });
// synthetic: a well-formed key the stand-in never gets to look up.
const KEY = 'mvl_abcdefgh_QFb4Y49c10NcuFScMdBxcHYYLIyEQB8Q7hhh5dkp'; // synthetic: a secret drawn once by crypto.randomBytes

let app: FastifyInstance | undefined;
afterEach(async () => {
  await app?.close();
  app = undefined;
});

async function answer(error: () => Error, url: string, method: 'GET' | 'POST' = 'GET') {
  app = await buildApp({ store: failingStore(error) });
  const response = await app.inject({
    method,
    url,
    headers: { authorization: `Bearer ${KEY}`, ...(method === 'POST' ? { 'content-type': 'application/json' } : {}) },
    ...(method === 'POST' ? { payload: '{"name":"x"}' } : {}),
  });
  return {
    status: response.statusCode,
    headers: response.headers,
    json: JSON.parse(response.body),
    text: response.body,
  };
}

describe('database faults over HTTP', () => {
  it.each([
    [
      'a terminated backend (57P01)',
      () => withCode('57P01', 'terminating connection due to administrator command'),
      'connection-lost',
      '2',
    ],
    ['a connection that dropped', () => new Error('Connection terminated unexpectedly'), 'connection-lost', '2'],
    ['a refused connection', () => withCode('ECONNREFUSED', 'connect ECONNREFUSED 127.0.0.1:5432'), 'unreachable', '5'],
    [
      'a server shutting down (57P03)',
      () => withCode('57P03', 'the database system is shutting down'),
      'unreachable',
      '5',
    ],
  ])(
    'answers %s with 503, Retry-After and problem+json, on reads and writes',
    async (_name, error, database, retryAfter) => {
      for (const [method, url] of [
        ['GET', '/v1/facilities'],
        ['POST', '/v1/facilities'],
      ] as const) {
        const reply = await answer(error, url, method);
        expect(reply.status, reply.text).toBe(503);
        expect(reply.headers['content-type']).toMatch(/^application\/problem\+json/);
        expect(reply.headers['retry-after']).toBe(retryAfter);
        expect(reply.json).toMatchObject({
          type: 'urn:mvledger:problem:unavailable',
          title: 'Not available right now',
          status: 503,
          database,
        });
        expect(reply.text).not.toMatch(/Internal error|ECONNREFUSED|127\.0\.0\.1|administrator/);
        if (method === 'POST') expect(reply.json.detail).toMatch(/stored whole or not at all/);
        await app!.close();
        app = undefined;
      }
    },
  );

  it('answers a busy SQLite file with 503 and Retry-After: 1, as before', async () => {
    const reply = await answer(() => withCode('SQLITE_BUSY', 'database is locked'), '/v1/facilities');
    expect(reply.status).toBe(503);
    expect(reply.headers['retry-after']).toBe('1');
    expect(reply.json.detail).toBe('the database is busy with another writer; nothing was stored, retry shortly');
  });

  it('keeps any other database error a bare 500', async () => {
    const reply = await answer(() => withCode('42601', 'syntax error at or near "selec"'), '/v1/facilities');
    expect(reply.status).toBe(500);
    expect(reply.json.title).toBe('Internal error');
    expect(reply.text).not.toContain('selec');
  });

  it.each([
    ['unreachable', () => withCode('ECONNREFUSED', 'connect ECONNREFUSED 127.0.0.1:5432')],
    ['unreachable', () => new Error('Connection terminated unexpectedly')],
    ['busy', () => withCode('SQLITE_BUSY', 'database is locked')],
    ['failing', () => withCode('42P01', 'relation "x" does not exist')],
  ])('says on /readyz that the database is %s, never "Internal error"', async (database, error) => {
    const reply = await answer(error, '/readyz');
    expect(reply.status).toBe(503);
    expect(reply.headers['content-type']).toMatch(/^application\/problem\+json/);
    expect(reply.headers['retry-after']).toBe('5');
    expect(reply.json).toMatchObject({
      status: 503,
      title: 'Not available right now',
      database,
      detail: expect.stringContaining('database'),
    });
    expect(reply.text).not.toMatch(/Internal error|ECONNREFUSED|does not exist/);
    expect((await app!.inject({ method: 'GET', url: '/healthz' })).statusCode).toBe(200);
  });
});
