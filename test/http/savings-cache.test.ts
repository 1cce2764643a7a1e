/**
 * Savings kept per data version are never stale. Two service instances share
 * one database (a SQLite file, or one PostgreSQL schema): instance A answers
 * savings from its memory, instance B makes every kind of write that can
 * change them (a reading, a correction, weather, an adjustment and its
 * withdrawal, rates, superseding the baseline, a variable's values), and after each one A must
 * answer exactly what an instance that keeps nothing (C, cache off) computes
 * from the database at that moment. Check values: that uncached instance (the
 * computation itself), and the HTTP contract of ETag / If-None-Match
 * (RFC 9110 §8.8.3, §13.1.2).
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { FastifyInstance } from 'fastify';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildApp } from '../../src/http/app.js';
import { SavingsCache } from '../../src/services/savings-cache.js';
import { openStore, type Store } from '../../src/store/connect.js';
import { makeTestApi, type TestApi } from '../support/api.js';
import { dropTestDatabase, freshTestDatabaseUrl, testDialect } from '../support/database.js';
import { CLIMATES, SAMPLE_BUILDING, dailyWeather, monthlyReadings, seededRandom } from '../support/synthetic.js';

// synthetic: the test sets the truth. 24 baseline bills, then 12 reporting bills after measures.
const random = seededRandom(41);
const WEATHER = dailyWeather(CLIMATES.temperate, '2023-01-01', 1096, random);
const BASELINE = monthlyReadings(SAMPLE_BUILDING, WEATHER, '2023-01-01', 24, random);
const REPORTING = monthlyReadings(
  { ...SAMPLE_BUILDING, base: 255, heatingRate: 6.5 },
  WEATHER,
  '2025-01-01',
  12,
  random,
);

interface Instance {
  app: FastifyInstance;
  store: Store;
  cache: SavingsCache;
}

let folder: string | null = null;
let url: string;
let api: TestApi; // instance A's organisation, keys and store
let a: Instance;
let b: Instance;
let c: Instance; // keeps nothing: the computation itself
let meterId: string;
let stationId: string;

async function instance(cacheBytes?: number): Promise<Instance> {
  const store = openStore(url);
  const cache = new SavingsCache(cacheBytes);
  const app = await buildApp({ store, savingsCache: cache });
  await app.ready();
  return { app, store, cache };
}

async function call(
  on: Instance,
  method: 'GET' | 'POST' | 'PUT',
  path: string,
  body?: unknown,
  headers: Record<string, string> = {},
) {
  const response = await on.app.inject({
    method,
    url: path,
    headers: {
      authorization: `Bearer ${api.keys.admin}`,
      ...(body === undefined ? {} : { 'content-type': 'application/json' }),
      ...headers,
    },
    ...(body === undefined ? {} : { payload: JSON.stringify(body) }),
  });
  return {
    status: response.statusCode,
    headers: response.headers,
    text: response.body,
    json: response.body ? JSON.parse(response.body) : undefined,
  };
}

const savingsPath = () => `/v1/meters/${meterId}/savings?confidence=0.9`;

/** A answers from memory, and what it answers is what C computes now. */
async function expectFresh(): Promise<{ text: string; etag: string }> {
  const truth = await call(c, 'GET', savingsPath());
  const first = await call(a, 'GET', savingsPath());
  const hits = a.cache.stats.hits;
  const again = await call(a, 'GET', savingsPath());
  expect(a.cache.stats.hits).toBe(hits + 1); // the second answer came from memory
  expect(first.status).toBe(200);
  expect(first.text).toBe(truth.text);
  expect(again.text).toBe(truth.text);
  expect(first.headers.etag).toBe(truth.headers.etag);
  return { text: first.text, etag: first.headers.etag as string };
}

beforeAll(async () => {
  if (testDialect() === 'sqlite') {
    folder = mkdtempSync(join(tmpdir(), 'mvl-savings-cache-'));
    url = `sqlite:${join(folder, 'shared.sqlite')}`;
  } else {
    url = freshTestDatabaseUrl();
  }
  api = await makeTestApi({ databaseUrl: url });
  a = await instance();
  b = await instance();
  c = await instance(0);

  const station = await call(b, 'POST', '/v1/weather-stations', {
    name: 'Invented hill station',
    temperatureUnit: 'F',
  });
  stationId = station.json.id;
  await call(b, 'PUT', `/v1/weather-stations/${stationId}/observations`, {
    observations: WEATHER.map((d) => ({ date: d.date, temp: d.temp })),
  });
  const facility = await call(b, 'POST', '/v1/facilities', { name: 'Cache test hall (invented)' });
  const meter = await call(b, 'POST', `/v1/facilities/${facility.json.id}/meters`, {
    name: 'Hall electric (invented)',
    fuel: 'electricity',
    unit: 'kWh',
    weatherStationId: stationId,
  });
  meterId = meter.json.id;
  const rows = [...BASELINE, ...REPORTING.slice(0, 11)].map((r) => ({
    start: r.start,
    end: r.end,
    quantity: r.quantity,
  }));
  expect((await call(b, 'POST', `/v1/meters/${meterId}/readings`, { readings: rows })).status).toBe(201);
  const draft = await call(b, 'POST', `/v1/meters/${meterId}/baselines`, { start: '2023-01-01', end: '2025-01-01' });
  expect((await call(b, 'POST', `/v1/baselines/${draft.json.id}/freeze`, { note: 'Agreed (test)' })).status).toBe(200);
});

afterAll(async () => {
  for (const each of [a, b, c]) {
    await each?.app.close();
    await each?.store.close();
  }
  await api?.close();
  if (folder) rmSync(folder, { recursive: true, force: true });
  else await dropTestDatabase(url);
});

describe('savings kept per data version', () => {
  it('answers If-None-Match with 304 while the figures stand, and 200 with a new ETag once they change', async () => {
    const { etag } = await expectFresh();
    expect(etag).toMatch(/^"[A-Za-z0-9_-]{43}"$/); // a strong tag: SHA-256 of the body, base64url
    const notModified = await call(a, 'GET', savingsPath(), undefined, { 'if-none-match': etag });
    expect(notModified.status).toBe(304);
    expect(notModified.text).toBe('');
    expect(notModified.headers.etag).toBe(etag);
    expect((await call(a, 'GET', savingsPath(), undefined, { 'if-none-match': `"other", W/${etag}` })).status).toBe(
      304,
    ); // weak comparison
    expect((await call(a, 'GET', savingsPath(), undefined, { 'if-none-match': '"other"' })).status).toBe(200);
    expect((await call(a, 'GET', savingsPath(), undefined, { 'if-none-match': '*' })).status).toBe(304);
    // Another organisation's key sees a 404, never the kept document.
    const other = await a.app.inject({
      method: 'GET',
      url: savingsPath(),
      headers: { authorization: `Bearer ${api.otherKey}` },
    });
    expect(other.statusCode).toBe(404);
  });

  it('is never stale: every write through instance B is seen by instance A at once', async () => {
    let previous = await expectFresh();
    const changed = async (what: string, bodyChanges = true) => {
      const now = await expectFresh();
      if (bodyChanges) expect(now.text, what).not.toBe(previous.text);
      const revalidated = await call(a, 'GET', savingsPath(), undefined, { 'if-none-match': previous.etag });
      expect(revalidated.status, what).toBe(bodyChanges ? 200 : 304);
      previous = now;
    };

    // A new reading.
    const last = REPORTING[11]!;
    expect(
      (
        await call(b, 'POST', `/v1/meters/${meterId}/readings`, {
          readings: [{ start: last.start, end: last.end, quantity: last.quantity }],
        })
      ).status,
    ).toBe(201);
    await changed('reading');

    // A correction.
    const first = REPORTING[0]!;
    const correction = await call(b, 'POST', `/v1/meters/${meterId}/readings`, {
      readings: [{ start: first.start, end: first.end, quantity: first.quantity * 0.9 }],
      correctionReason: 'Meter re-read (test)',
    });
    expect(correction.json.corrected).toBe(1);
    await changed('correction');

    // Weather inside the reporting period.
    const day = WEATHER.find((d) => d.date === '2025-03-10')!;
    expect(
      (
        await call(b, 'PUT', `/v1/weather-stations/${stationId}/observations`, {
          observations: [{ date: day.date, temp: day.temp + 9 }],
        })
      ).json.updated,
    ).toBe(1);
    await changed('weather');

    // A non-routine adjustment, then its withdrawal.
    const adjustment = await call(b, 'POST', `/v1/meters/${meterId}/adjustments`, {
      start: '2025-04-01',
      end: '2025-05-01',
      quantity: 1500,
      reason: 'Temporary tenant (test)',
    });
    expect(adjustment.status).toBe(201);
    await changed('adjustment');
    expect(
      (await call(b, 'POST', `/v1/adjustments/${adjustment.json.id}/withdraw`, { reason: 'Recorded in error (test)' }))
        .status,
    ).toBe(200);
    await changed('withdrawal');

    // Rates: the savings document carries no cost, so its bytes stand (304), but the meter's version moved.
    const version = async () =>
      (
        await api.store.db
          .selectFrom('meter_data_versions')
          .select('version')
          .where('meter_id', '=', meterId)
          .executeTakeFirstOrThrow()
      ).version;
    const before = await version();
    expect(
      (
        await call(b, 'PUT', `/v1/meters/${meterId}/rates`, {
          currency: 'USD',
          rates: [{ from: '2023-01-01', price: 0.12 }],
        })
      ).status,
    ).toBe(200);
    expect(await version()).not.toBe(before);
    const misses = a.cache.stats.misses;
    await changed('rate', false);
    expect(a.cache.stats.misses).toBe(misses + 1); // computed afresh under the new version

    // Superseding the baseline with one fitted on a later window.
    const draft = await call(b, 'POST', `/v1/meters/${meterId}/baselines`, { start: '2023-02-01', end: '2025-01-01' });
    expect(draft.status).toBe(201);
    const frozen = await call(b, 'POST', `/v1/baselines/${draft.json.id}/freeze`, {
      note: 'Re-agreed (test)',
      supersedeReason: 'Corrected window (test)',
    });
    expect(frozen.status).toBe(200);
    await changed('supersede');
    expect(JSON.parse(previous.text).baselineId).toBe(draft.json.id);

    // A facility variable's values: the weather-only model reads none, so the bytes stand (304), but the version moved.
    const { facility_id: facilityId } = await api.store.db
      .selectFrom('meters')
      .select('facility_id')
      .where('id', '=', meterId)
      .executeTakeFirstOrThrow();
    const variable = await call(b, 'POST', `/v1/facilities/${facilityId}/variables`, {
      name: 'people',
      unit: 'people',
      kind: 'daily',
      aggregation: 'mean',
    });
    expect(variable.status).toBe(201);
    const beforeValues = await version();
    expect(
      (
        await call(b, 'POST', `/v1/variables/${variable.json.id}/values`, {
          values: [{ date: '2025-06-02', value: 40 }],
        })
      ).status,
    ).toBe(201);
    expect(await version()).not.toBe(beforeValues);
    await changed('variable values', false);
  });
});
