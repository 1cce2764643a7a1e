/**
 * Every error is RFC 9457 problem+json. Check values: RFC 9457 (the members
 * type, title, status, detail; the media type application/problem+json) and
 * RFC 9110 (the status codes 400, 404, 413, 415).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { FastifyInstance } from 'fastify';
import { buildApp } from '../../src/http/app.js';
import { createKey, createOrganisation } from '../../src/services/organisations.js';
import { makeTestApi, type ApiResponse, type TestApi } from '../support/api.js';
import { databaseDigest } from '../support/db-digest.js';

let api: TestApi;
beforeAll(async () => {
  api = await makeTestApi();
});
afterAll(async () => api.close());

function expectProblem(response: ApiResponse, status: number): void {
  expect(response.status).toBe(status);
  expect(response.headers['content-type']).toMatch(/^application\/problem\+json/); // RFC 9457 §3
  expect(response.json).toMatchObject({
    type: expect.any(String),
    title: expect.any(String),
    status,
    detail: expect.any(String),
  });
  expect(response.json.detail.length).toBeGreaterThan(0);
  // No stack traces or source paths in a body (common practice).
  expect(response.text).not.toMatch(/\n\s+at |\bat .+:\d+:\d+|\.ts:\d+|node_modules|stack/);
}

describe('problem+json for every kind of error', () => {
  it('answers an unknown route with 404', async () => {
    const response = await api.call('GET', '/v1/no-such-thing');
    expectProblem(response, 404);
    expect(response.json.detail).toContain('/v1/no-such-thing');
    expectProblem(await api.call('DELETE', '/v1/facilities', { as: 'none' }), 404);
  });

  it('answers invalid JSON with 400 and stores nothing', async () => {
    const before = await databaseDigest(api.store.db);
    const response = await api.call('POST', '/v1/facilities', {
      body: '{"name": "Unclosed',
      headers: { 'content-type': 'application/json' },
    });
    expectProblem(response, 400);
    expect(response.json.detail).toContain('JSON');
    expect(await databaseDigest(api.store.db)).toBe(before);
  });

  it('answers an empty JSON body with 400', async () => {
    const response = await api.app.inject({
      method: 'POST',
      url: '/v1/facilities',
      headers: { authorization: `Bearer ${api.keys.admin}`, 'content-type': 'application/json' },
    });
    expectProblem(
      { status: response.statusCode, headers: response.headers, text: response.body, json: response.json() },
      400,
    );
  });

  it('answers a content type the route does not take with 415', async () => {
    const before = await databaseDigest(api.store.db);
    const response = await api.call('POST', '/v1/facilities', {
      body: 'name=Form Hall',
      headers: { 'content-type': 'application/x-www-form-urlencoded' },
    });
    expectProblem(response, 415);
    expectProblem(
      await api.call('POST', '/v1/facilities', { body: '<facility/>', headers: { 'content-type': 'application/xml' } }),
      415,
    );
    expect(await databaseDigest(api.store.db)).toBe(before);
  });

  it('answers 401 and 403 as problems too', async () => {
    const unauthorised = await api.call('GET', '/v1/facilities', { as: 'none' });
    expectProblem(unauthorised, 401);
    expect(unauthorised.headers['www-authenticate']).toContain('Bearer'); // RFC 9110 §11.6.1: a 401 names its scheme
    expectProblem(await api.call('POST', '/v1/facilities', { as: 'analyst', body: { name: 'x' } }), 403);
  });

  it('answers schema failures with 400 and a field list', async () => {
    const response = await api.call('POST', '/v1/facilities', { body: { name: 7 } });
    expectProblem(response, 400);
    expect(response.json.errors).toEqual([{ field: 'name', message: expect.any(String) }]);
  });

  it('answers a missing resource with 404 naming it', async () => {
    const response = await api.call('GET', '/v1/meters/mtr_absent');
    expectProblem(response, 404);
    expect(response.json.detail).toContain('mtr_absent');
  });
});

describe('a body over the size limit', () => {
  let app: FastifyInstance;
  let token: string;
  const LIMIT = 256; // synthetic: the test sets the limit

  beforeAll(async () => {
    const organisation = await createOrganisation(
      api.store.db,
      'Small Bodies Ltd (invented)',
      '2026-01-01T00:00:00.000Z',
    );
    token = (
      await createKey(api.store.db, {
        organisationId: organisation.id,
        name: 'admin',
        role: 'admin',
        at: '2026-01-01T00:00:00.000Z',
      })
    ).token;
    app = await buildApp({ store: api.store, bodyLimit: LIMIT });
  });
  afterAll(async () => app.close());

  it('is refused with 413, stores nothing, and a body under the limit still works', async () => {
    const before = await databaseDigest(api.store.db);
    const big = JSON.stringify({ name: 'Large Hall', address: 'x'.repeat(LIMIT) });
    const response = await app.inject({
      method: 'POST',
      url: '/v1/facilities',
      headers: { authorization: `Bearer ${token}`, 'content-type': 'application/json' },
      payload: big,
    });
    expectProblem(
      { status: response.statusCode, headers: response.headers, text: response.body, json: response.json() },
      413,
    );
    expect(response.json().detail).toContain(String(LIMIT));
    expect(await databaseDigest(api.store.db)).toBe(before);

    const small = await app.inject({
      method: 'POST',
      url: '/v1/facilities',
      headers: { authorization: `Bearer ${token}`, 'content-type': 'application/json' },
      payload: { name: 'Small Hall' },
    });
    expect(small.statusCode).toBe(201);
  });
});
