/**
 * Per-key rate limits: buildApp({ rateLimitPerMinute }) (RATE_LIMIT_PER_MINUTE
 * for the service). Each test builds its own limited app, so every bucket
 * starts empty; no test waits for a window to pass.
 *
 * The documented behaviour, as src/http/app.ts keys the buckets:
 * - a request with a live key counts against that key alone, whatever the
 *   route; another key of the same organisation has its own budget;
 * - routes without a permission (/healthz, /readyz, /docs, /openapi.json)
 *   have no key: the health probes are never limited, and the rest count per
 *   client address, in one bucket apart from every key's;
 * - a key that does not authenticate is refused (401) before the limit is
 *   consulted, so it neither counts nor is ever answered 429.
 *
 * Check values: the API contract (429 problem+json with Retry-After in
 * seconds, RFC 9110 §10.2.3 and RFC 6585 §4; nothing stored, shown by
 * databaseDigest); the limit itself is synthetic: the test sets it.
 */
import type { FastifyInstance, InjectOptions } from 'fastify';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { buildApp } from '../../src/http/app.js';
import type { Role } from '../../src/domain/principal.js';
import { makeTestApi, type TestApi } from '../support/api.js';
import { databaseDigest } from '../support/db-digest.js';

const LIMIT = 5; // synthetic: the test sets the limit

let api: TestApi;
let app: FastifyInstance;

beforeAll(async () => {
  api = await makeTestApi();
});
afterAll(async () => api?.close());
afterEach(async () => app?.close());

async function limitedApp(): Promise<FastifyInstance> {
  app = await buildApp({ store: api.store, rateLimitPerMinute: LIMIT });
  return app;
}

function as(role: Role, options: InjectOptions): InjectOptions {
  return { ...options, headers: { ...options.headers, authorization: `Bearer ${api.keys[role]}` } };
}

async function expectRateLimited(response: Awaited<ReturnType<FastifyInstance['inject']>>): Promise<void> {
  expect(response.statusCode).toBe(429);
  expect(response.headers['content-type']).toContain('application/problem+json');
  expect(response.json()).toMatchObject({ type: 'urn:mvledger:problem:rate-limited', status: 429 });
  expect(response.json().detail).toContain(`more than ${LIMIT} requests a minute`);
  const retryAfter = Number(response.headers['retry-after']);
  expect(Number.isInteger(retryAfter)).toBe(true); // delay-seconds
  expect(retryAfter).toBeGreaterThan(0);
  expect(retryAfter).toBeLessThanOrEqual(60); // never longer than the one-minute window
}

describe('a key over its limit', () => {
  it(`gets 429 problem+json with Retry-After on request ${LIMIT + 1}, while another key still gets 200`, async () => {
    const limited = await limitedApp();
    const read = { method: 'GET', url: '/v1/facilities' } as const;
    for (let i = 1; i <= LIMIT; i++) {
      const response = await limited.inject(as('analyst', read));
      expect(response.statusCode).toBe(200);
      expect(response.headers['x-ratelimit-remaining']).toBe(String(LIMIT - i));
    }
    await expectRateLimited(await limited.inject(as('analyst', read)));
    await expectRateLimited(await limited.inject(as('analyst', { method: 'GET', url: `/v1/meters/mtr_absent` }))); // every route shares the key's budget
    expect((await limited.inject(as('engineer', read))).statusCode).toBe(200);
    expect((await limited.inject(as('admin', read))).statusCode).toBe(200);
  });

  it('is refused a write that then stores nothing, with or without an Idempotency-Key', async () => {
    const limited = await limitedApp();
    for (let i = 0; i < LIMIT; i++)
      expect((await limited.inject(as('engineer', { method: 'GET', url: '/v1/facilities' }))).statusCode).toBe(200);
    const before = await databaseDigest(api.store.db);
    const write = { method: 'POST', url: '/v1/facilities', payload: { name: 'Refused Hall (invented)' } } as const;
    await expectRateLimited(await limited.inject(as('engineer', write)));
    await expectRateLimited(
      await limited.inject(as('engineer', { ...write, headers: { 'idempotency-key': 'over-the-limit' } })),
    );
    expect(await databaseDigest(api.store.db)).toBe(before); // no facility, no audit row, no idempotency key
    // The same write by another key of the organisation goes through.
    expect(
      (await limited.inject(as('admin', { ...write, headers: { 'idempotency-key': 'over-the-limit' } }))).statusCode,
    ).toBe(201);
  });

  it('is not limited at all when no limit is set', async () => {
    for (let i = 0; i <= LIMIT + 1; i++) {
      const response = await api.app.inject(as('analyst', { method: 'GET', url: '/v1/facilities' }));
      expect(response.statusCode).toBe(200);
      expect(response.headers['x-ratelimit-limit']).toBeUndefined();
    }
  });
});

describe('requests without a key', () => {
  it('never limits the health probes; count the docs per client address, apart from every key', async () => {
    const limited = await limitedApp();
    const from = (remoteAddress: string, url: string): InjectOptions => ({ method: 'GET', url, remoteAddress });
    const here = '127.0.0.1';
    const elsewhere = '192.0.2.7'; // RFC 5737 documentation address
    // A load balancer's probes must never be refused for coming often.
    for (let i = 0; i < 3 * LIMIT; i++) {
      expect((await limited.inject(from(here, '/healthz'))).statusCode).toBe(200);
      expect((await limited.inject(from(here, '/readyz'))).statusCode).toBe(200);
    }
    for (let i = 0; i < LIMIT; i++) expect((await limited.inject(from(here, '/openapi.json'))).statusCode).toBe(200);
    await expectRateLimited(await limited.inject(from(here, '/openapi.json')));
    expect((await limited.inject(from(elsewhere, '/openapi.json'))).statusCode).toBe(200);
    // A key from the same address has its own budget.
    expect((await limited.inject(as('analyst', { ...from(here, '/v1/facilities') }))).statusCode).toBe(200);
  });

  it('are refused 401 before the limit when the key does not authenticate, and are never answered 429', async () => {
    const limited = await limitedApp();
    const forged = `Bearer mvl_${api.keys.analyst.split('_')[1]}_${'z'.repeat(40)}`;
    for (let i = 0; i < 2 * LIMIT; i++) {
      expect(
        (await limited.inject({ method: 'GET', url: '/v1/facilities', headers: { authorization: forged } })).statusCode,
      ).toBe(401);
    }
    // Neither the address nor the real key was charged for them.
    expect((await limited.inject({ method: 'GET', url: '/openapi.json' })).headers['x-ratelimit-remaining']).toBe(
      String(LIMIT - 1),
    );
    expect(
      (await limited.inject(as('analyst', { method: 'GET', url: '/v1/facilities' }))).headers['x-ratelimit-remaining'],
    ).toBe(String(LIMIT - 1));
  });
});
