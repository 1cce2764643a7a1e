/**
 * What the service promises about security, end to end: protective headers
 * on every kind of response, a request size limit that stores nothing, API
 * keys that never leave the one response that creates them, and the
 * Authorization cases test/http/roles.test.ts does not already cover.
 *
 * Check values: common practice for the headers (OWASP's secure-headers
 * guidance: nosniff, no framing, a referrer policy, a CSP on HTML, no
 * x-powered-by); RFC 9110 §11.1 (the auth scheme is case-insensitive) and
 * §5.3 (Authorization is not a list, so two lines are ambiguous and
 * refused); the API contract (401 problem+json for any key that does not
 * authenticate; 413 problem+json for a body over the limit; nothing stored).
 */
import { connect } from 'node:net';
import { Writable } from 'node:stream';
import type { FastifyInstance } from 'fastify';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildApp, LOG_REDACTIONS } from '../../src/http/app.js';
import { makeTestApi, type ApiResponse, type TestApi } from '../support/api.js';
import { databaseDigest } from '../support/db-digest.js';
import { CLIMATES, SAMPLE_BUILDING, dailyWeather, monthlyReadings, seededRandom } from '../support/synthetic.js';

// synthetic: an invented building and climate, 24 monthly bills: enough for a draft baseline and its chart.
const random = seededRandom(61);
const WEATHER = dailyWeather(CLIMATES.temperate, '2023-01-01', 731, random);
const BILLS = monthlyReadings(SAMPLE_BUILDING, WEATHER, '2023-01-01', 24, random);

let api: TestApi;
let meterId: string;
let baselineId: string;

beforeAll(async () => {
  api = await makeTestApi();
  const station = await api.call('POST', '/v1/weather-stations', {
    body: { name: 'Invented hill station', temperatureUnit: 'F' },
  });
  await api.call('PUT', `/v1/weather-stations/${station.json.id}/observations`, {
    body: { observations: WEATHER.map((d) => ({ date: d.date, temp: d.temp })) },
  });
  const facility = await api.call('POST', '/v1/facilities', { body: { name: 'Guarded Hall (invented)' } });
  const meter = await api.call('POST', `/v1/facilities/${facility.json.id}/meters`, {
    body: { name: 'Main electric (invented)', fuel: 'electricity', unit: 'kWh', weatherStationId: station.json.id },
  });
  meterId = meter.json.id;
  expect(
    (
      await api.call('POST', `/v1/meters/${meterId}/readings`, {
        body: { readings: BILLS.map((r) => ({ start: r.start, end: r.end, quantity: r.quantity })) },
      })
    ).status,
  ).toBe(201);
  const baseline = await api.call('POST', `/v1/meters/${meterId}/baselines`, {
    body: { start: '2023-01-01', end: '2025-01-01' },
  });
  expect(baseline.status).toBe(201);
  baselineId = baseline.json.id;
});
afterAll(async () => api?.close());

describe('protective headers on every kind of response', () => {
  const kinds: { kind: string; send: () => Promise<ApiResponse>; status: number; type: string }[] = [
    {
      kind: 'JSON',
      send: () => api.call('GET', '/v1/facilities', { as: 'analyst' }),
      status: 200,
      type: 'application/json',
    },
    {
      kind: 'SVG',
      send: () => api.call('GET', `/v1/baselines/${baselineId}/signature.svg`, { as: 'analyst' }),
      status: 200,
      type: 'image/svg+xml',
    },
    {
      kind: 'problem (404)',
      send: () => api.call('GET', '/v1/meters/mtr_absent', { as: 'analyst' }),
      status: 404,
      type: 'application/problem+json',
    },
    {
      kind: 'problem (401)',
      send: () => api.call('GET', '/v1/facilities', { as: 'none' }),
      status: 401,
      type: 'application/problem+json',
    },
    {
      kind: 'problem (400)',
      send: () => api.call('POST', '/v1/facilities', { body: { name: 7 } }),
      status: 400,
      type: 'application/problem+json',
    },
    { kind: 'docs page', send: () => api.call('GET', '/docs/', { as: 'none' }), status: 200, type: 'text/html' },
    { kind: 'health', send: () => api.call('GET', '/healthz', { as: 'none' }), status: 200, type: 'application/json' },
  ];
  for (const { kind, send, status, type } of kinds) {
    it(`${kind}: nosniff, no framing, a referrer policy, no x-powered-by`, async () => {
      const response = await send();
      expect(response.status).toBe(status);
      expect(String(response.headers['content-type'])).toContain(type);
      expect(response.headers['x-content-type-options']).toBe('nosniff');
      const csp = String(response.headers['content-security-policy'] ?? '');
      const framing = String(response.headers['x-frame-options'] ?? '').toUpperCase();
      expect(csp.includes("frame-ancestors 'none'") || framing === 'DENY').toBe(true);
      expect(response.headers['referrer-policy']).toBe('no-referrer');
      expect(response.headers['x-powered-by']).toBeUndefined();
    });
  }

  it('gives the docs page a CSP that allows no inline or foreign script and no plugins', async () => {
    const csp = String((await api.call('GET', '/docs/', { as: 'none' })).headers['content-security-policy']);
    const directive = (name: string) =>
      csp
        .split(';')
        .find((part) => part.trim().startsWith(`${name} `))
        ?.trim();
    expect(directive('script-src')).toBe("script-src 'self'");
    expect(directive('object-src')).toBe("object-src 'none'");
    expect(directive('frame-ancestors')).toBe("frame-ancestors 'none'");
  });
});

describe('the request size limit', () => {
  const LIMIT = 400; // synthetic: the test sets the limit (12 bills are about 500 bytes as CSV, 870 as JSON)
  let small: FastifyInstance;
  beforeAll(async () => {
    small = await buildApp({ store: api.store, bodyLimit: LIMIT });
  });
  afterAll(async () => small?.close());

  // test/http/problems.test.ts covers a JSON facility; these are the bulk routes, JSON and CSV.
  const bodies: { what: string; contentType: string; payload: () => string }[] = [
    {
      what: 'a JSON batch of readings',
      contentType: 'application/json',
      payload: () =>
        JSON.stringify({ readings: manyReadings().map((r) => ({ start: r.start, end: r.end, quantity: r.quantity })) }),
    },
    {
      what: 'a CSV batch of readings',
      contentType: 'text/csv',
      payload: () =>
        ['start,end,quantity', ...manyReadings().map((r) => `${r.start},${r.end},${r.quantity}`)].join('\n'),
    },
  ];
  for (const { what, contentType, payload } of bodies) {
    it(`refuses ${what} over the limit with 413 problem+json and stores nothing`, async () => {
      const body = payload();
      expect(Buffer.byteLength(body)).toBeGreaterThan(LIMIT);
      const before = await databaseDigest(api.store.db);
      const response = await small.inject({
        method: 'POST',
        url: `/v1/meters/${meterId}/readings`,
        headers: {
          authorization: `Bearer ${api.keys.integration}`,
          'content-type': contentType,
          'idempotency-key': `too-big-${contentType}`,
        },
        payload: body,
      });
      expect(response.statusCode).toBe(413);
      expect(response.headers['content-type']).toContain('application/problem+json');
      expect(response.json()).toMatchObject({ type: 'urn:mvledger:problem:payload-too-large', status: 413 });
      expect(response.headers['x-content-type-options']).toBe('nosniff');
      expect(await databaseDigest(api.store.db)).toBe(before); // nor an idempotency key
    });
  }

  /** 2025 bills of the same building: new periods, so only the size can refuse them. */
  function manyReadings() {
    return monthlyReadings(
      SAMPLE_BUILDING,
      dailyWeather(CLIMATES.temperate, '2025-01-01', 365, seededRandom(62)),
      '2025-01-01',
      12,
      seededRandom(63),
    );
  }
});

describe('a key leaves the service once, in the response that creates it', () => {
  it('appears in no log line, no header and no other body across create, use, list, audit and revoke', async () => {
    const lines: string[] = [];
    const stream = new Writable({
      write(chunk, _encoding, done) {
        lines.push(String(chunk));
        done();
      },
    });
    // The service's own logger settings (src/server.ts), at the most talkative level.
    const app = await buildApp({ store: api.store, logger: { level: 'trace', stream, redact: LOG_REDACTIONS } });
    const exchanges: { step: string; status: number; headers: string; body: string }[] = [];
    const send = async (
      step: string,
      method: 'GET' | 'POST' | 'DELETE',
      url: string,
      token: string,
      payload?: object,
      headers: Record<string, string> = {},
    ) => {
      const response = await app.inject({
        method,
        url,
        headers: { authorization: `Bearer ${token}`, ...headers },
        ...(payload ? { payload } : {}),
      });
      exchanges.push({
        step,
        status: response.statusCode,
        headers: JSON.stringify(response.headers),
        body: response.body,
      });
      return response;
    };
    try {
      const created = await send('create', 'POST', '/v1/api-keys', api.keys.admin, {
        name: 'cycle (invented)',
        role: 'engineer',
      });
      const token = created.json().token as string;
      const keyId = created.json().key.id as string;
      const secret = token.split('_')[2]!;
      await send('use: read', 'GET', '/v1/facilities', token);
      await send(
        'use: write',
        'POST',
        '/v1/facilities',
        token,
        { name: 'Cycle Hall (invented)' },
        { 'idempotency-key': 'cycle-write' },
      );
      await send(
        'use: replay',
        'POST',
        '/v1/facilities',
        token,
        { name: 'Cycle Hall (invented)' },
        { 'idempotency-key': 'cycle-write' },
      );
      await send('list', 'GET', '/v1/api-keys', api.keys.admin);
      await send('audit', 'GET', `/v1/audit?entityId=${keyId}`, api.keys.admin);
      await send('revoke', 'DELETE', `/v1/api-keys/${keyId}`, api.keys.admin);
      await send('use after revoke', 'GET', '/v1/facilities', token);
      expect(exchanges.map((e) => `${e.step} ${e.status}`)).toEqual([
        'create 201',
        'use: read 200',
        'use: write 201',
        'use: replay 201',
        'list 200',
        'audit 200',
        'revoke 200',
        'use after revoke 401',
      ]); // the API contract

      const hash = (
        await api.store.db
          .selectFrom('api_keys')
          .select('secret_hash')
          .where('id', '=', keyId)
          .executeTakeFirstOrThrow()
      ).secret_hash;
      const carrying = (needle: string) => exchanges.filter((e) => e.body.includes(needle)).map((e) => e.step);
      expect(carrying(secret)).toEqual(['create']);
      expect(exchanges.filter((e) => e.headers.includes(secret)).map((e) => e.step)).toEqual([]);
      expect(carrying(hash)).toEqual([]);
      expect(lines.length).toBeGreaterThan(exchanges.length); // the logger really was writing
      expect(lines.filter((line) => line.includes(secret) || line.includes(hash))).toEqual([]);
      // Nor is it kept anywhere but as its hash: the audit rows and stored replies never hold it.
      const audit = await api.store.db
        .selectFrom('audit_log')
        .select(['before_json', 'after_json'])
        .where('entity_id', '=', keyId)
        .execute();
      expect(audit.length).toBeGreaterThan(0);
      expect(JSON.stringify(audit).includes(secret) || JSON.stringify(audit).includes(hash)).toBe(false);
      const replies = await api.store.db.selectFrom('idempotency_keys').select('response_body').execute();
      expect(replies.some((row) => (row.response_body ?? '').includes(secret))).toBe(false);
    } finally {
      await app.close();
    }
  });
});

describe('Authorization cases beyond test/http/roles.test.ts', () => {
  let served: FastifyInstance;
  let port: number;
  beforeAll(async () => {
    served = await buildApp({ store: api.store });
    await served.listen({ port: 0, host: '127.0.0.1' });
    port = (served.server.address() as { port: number }).port;
  });
  afterAll(async () => served?.close());

  const analystId = () => api.keys.analyst.split('_')[1]!;
  const analystSecret = () => api.keys.analyst.split('_')[2]!;
  const refusals: { what: string; headers: () => Record<string, string>; url?: () => string }[] = [
    {
      what: 'the right id with a shorter wrong secret',
      headers: () => ({ authorization: `Bearer mvl_${analystId()}_${'z'.repeat(33)}` }),
    },
    {
      what: 'the right id with a longer wrong secret',
      headers: () => ({ authorization: `Bearer mvl_${analystId()}_${'z'.repeat(90)}` }),
    },
    {
      what: 'the right secret with one character more',
      headers: () => ({ authorization: `Bearer ${api.keys.analyst}A` }),
    },
    {
      what: 'the right secret under another key id',
      headers: () => ({ authorization: `Bearer mvl_${api.keys.engineer.split('_')[1]}_${analystSecret()}` }),
    },
    { what: 'the key without a scheme', headers: () => ({ authorization: api.keys.analyst }) },
    { what: 'the key under the Basic scheme', headers: () => ({ authorization: `Basic ${api.keys.analyst}` }) },
    {
      what: 'the key in ?key= and no header',
      headers: () => ({}),
      url: () => `/v1/facilities?key=${api.keys.analyst}`,
    },
    {
      what: 'the key in ?access_token= and no header',
      headers: () => ({}),
      url: () => `/v1/facilities?access_token=${api.keys.analyst}`,
    },
    { what: 'the key in an X-API-Key header', headers: () => ({ 'x-api-key': api.keys.analyst }) },
  ];
  for (const c of refusals) {
    it(`answers 401 problem+json to ${c.what}`, async () => {
      const response = await api.call('GET', c.url?.() ?? '/v1/facilities', { as: 'none', headers: c.headers() });
      expect(response.status).toBe(401);
      expect(response.headers['content-type']).toContain('application/problem+json');
      expect(response.headers['www-authenticate']).toContain('Bearer');
      expect(response.text).not.toContain(analystSecret());
    });
  }

  it('accepts the scheme in any case (RFC 9110 §11.1)', async () => {
    for (const scheme of ['bearer', 'BEARER', 'Bearer']) {
      expect(
        (
          await api.call('GET', '/v1/facilities', {
            as: 'none',
            headers: { authorization: `${scheme} ${api.keys.analyst}` },
          })
        ).status,
      ).toBe(200);
    }
  });

  /** One raw HTTP/1.1 exchange, so header lines reach the server exactly as written. */
  function rawStatus(headerLines: string[]): Promise<number> {
    return new Promise((resolve, reject) => {
      const socket = connect(port, '127.0.0.1', () =>
        socket.write(
          ['GET /v1/facilities HTTP/1.1', 'Host: 127.0.0.1', ...headerLines, 'Connection: close', '', ''].join('\r\n'),
        ),
      );
      let text = '';
      socket.on('data', (chunk) => (text += chunk));
      socket.on('end', () => resolve(Number(/^HTTP\/1\.1 (\d{3})/.exec(text)?.[1])));
      socket.on('error', reject);
    });
  }

  it('refuses two Authorization lines whichever comes first, even two copies of a live key', async () => {
    const live = `Authorization: Bearer ${api.keys.analyst}`;
    const forged = `Authorization: Bearer mvl_${analystId()}_${'z'.repeat(40)}`;
    expect(await rawStatus([live])).toBe(200); // the socket path itself works
    expect(await rawStatus([live, forged])).toBe(401);
    expect(await rawStatus([forged, live])).toBe(401);
    expect(await rawStatus([live, live])).toBe(401);
  });
});
