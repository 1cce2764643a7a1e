/**
 * Lists answer in pages: every list endpoint takes limit and cursor, states
 * its default and maximum in the OpenAPI document, and walking nextCursor
 * gives every row once, in order. Check values: synthetic data whose truth
 * the test sets (the rows it stored), and the page sizes this service states
 * (services/paging.ts).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { addDays } from '../../src/engine/index.js';
import { PAGE_SIZES } from '../../src/services/paging.js';
import { makeTestApi, type TestApi } from '../support/api.js';
import { databaseDigest } from '../support/db-digest.js';

let api: TestApi;
let stationId: string;
let facilityId: string;
let meterId: string;
const DAYS = 2_345; // synthetic: more than two default pages of daily readings

beforeAll(async () => {
  api = await makeTestApi();
  stationId = (
    await api.call('POST', '/v1/weather-stations', {
      body: { name: 'Paging station (invented)', temperatureUnit: 'C' },
    })
  ).json.id;
  facilityId = (await api.call('POST', '/v1/facilities', { body: { name: 'Paging depot (invented)' } })).json.id;
  for (const name of ['Second depot (invented)', 'Third depot (invented)'])
    await api.call('POST', '/v1/facilities', { body: { name } });
  meterId = (
    await api.call('POST', `/v1/facilities/${facilityId}/meters`, {
      body: { name: 'Paging meter (invented)', fuel: 'electricity', unit: 'kWh', weatherStationId: stationId },
    })
  ).json.id;
  const readings = Array.from({ length: DAYS }, (_, d) => ({
    start: addDays('2020-01-01', d),
    end: addDays('2020-01-01', d + 1),
    quantity: d,
  }));
  expect((await api.call('POST', `/v1/meters/${meterId}/readings`, { body: { readings } })).status).toBe(201);
  const observations = Array.from({ length: 1500 }, (_, d) => ({ date: addDays('2020-01-01', d), temp: (d % 30) - 5 }));
  expect(
    (await api.call('PUT', `/v1/weather-stations/${stationId}/observations`, { body: { observations } })).status,
  ).toBe(200);
  // Adjustments need a frozen baseline to be posted; for listing, rows straight into the store will do.
  for (let i = 0; i < 3; i++) {
    const start = addDays('2021-01-01', 40 * i);
    await api.store.db
      .insertInto('adjustments')
      .values({
        id: `adj_paging_${i}`,
        organisation_id: api.organisationId,
        meter_id: meterId,
        period_start: start,
        period_end: addDays(start, 10),
        quantity: 100 + i,
        per_day: null,
        reason: `Event ${i} (test)`,
        created_at: '2026-01-01T00:00:00.000Z',
        created_by: 'test',
        withdrawn_at: null,
        withdrawn_by: null,
        withdraw_reason: null,
        uncertainty: null,
      })
      .execute();
  }
});
afterAll(async () => {
  await api.close();
});

/** Every page of a list, following nextCursor. */
async function walk(path: string, field: string, limit?: number): Promise<{ pages: number; rows: any[] }> {
  const rows: any[] = [];
  let cursor: string | null = null;
  let pages = 0;
  do {
    const params = new URLSearchParams();
    if (limit !== undefined) params.set('limit', String(limit));
    if (cursor !== null) params.set('cursor', cursor);
    const query = params.size > 0 ? `${path.includes('?') ? '&' : '?'}${params}` : '';
    const response = await api.call('GET', `${path}${query}`);
    expect(response.status, response.text).toBe(200);
    rows.push(...response.json[field]);
    cursor = response.json.nextCursor;
    pages++;
  } while (cursor !== null && pages < 100);
  return { pages, rows };
}

describe('lists in pages', () => {
  it('readings: the default page, then every row once and in order by following nextCursor', async () => {
    const first = await api.call('GET', `/v1/meters/${meterId}/readings`);
    expect(first.json.limit).toBe(PAGE_SIZES.series.default);
    expect(first.json.readings).toHaveLength(1000); // the stated default
    expect(first.json.nextCursor).toEqual(expect.any(String));
    const { pages, rows } = await walk(`/v1/meters/${meterId}/readings`, 'readings');
    expect(pages).toBe(3); // 2,345 rows at 1,000 a page
    expect(rows.map((r) => r.quantity)).toEqual(Array.from({ length: DAYS }, (_, d) => d)); // synthetic: quantity = day number
    // A date range and a page size together.
    const ranged = await walk(`/v1/meters/${meterId}/readings?from=2021-01-01&to=2021-03-01`, 'readings', 25);
    expect(ranged.rows).toHaveLength(59); // hand-worked: January 31 + February 2021 28
    expect(ranged.pages).toBe(3);
  });

  it('a request for more than the maximum is refused, naming the field; a bad cursor likewise; nothing is stored', async () => {
    const digest = await databaseDigest(api.store.db);
    const tooMany = await api.call('GET', `/v1/meters/${meterId}/readings?limit=200000`);
    expect(tooMany.status).toBe(400);
    expect(tooMany.json.errors[0].field).toBe('query.limit');
    for (const cursor of ['not-a-cursor', Buffer.from('["observations","2020-01-01"]').toString('base64url')]) {
      const bad = await api.call('GET', `/v1/meters/${meterId}/readings?cursor=${cursor}`);
      expect(bad.status).toBe(400);
      expect(bad.json.errors[0].field).toBe('query.cursor');
    }
    expect(await databaseDigest(api.store.db)).toBe(digest);
  });

  it('every other list pages the same way', async () => {
    const observations = await walk(`/v1/weather-stations/${stationId}/observations`, 'observations', 400);
    expect(observations.pages).toBe(4);
    expect(observations.rows.map((o) => o.date)).toEqual(
      Array.from({ length: 1500 }, (_, d) => addDays('2020-01-01', d)),
    );

    const facilities = await walk('/v1/facilities', 'facilities', 2);
    expect(facilities.rows.map((f) => f.name)).toEqual([
      'Paging depot (invented)',
      'Second depot (invented)',
      'Third depot (invented)',
    ]);
    expect(facilities.pages).toBe(2);

    expect((await walk('/v1/weather-stations', 'stations', 1)).rows.map((s) => s.id)).toEqual([stationId]);
    expect((await walk(`/v1/facilities/${facilityId}/meters`, 'meters', 1)).rows.map((m) => m.id)).toEqual([meterId]);
    const keys = await walk('/v1/api-keys', 'keys', 3);
    expect(keys.rows).toHaveLength(4); // makeTestApi: one key per role
    expect(keys.pages).toBe(2);
    const adjustments = await walk(`/v1/meters/${meterId}/adjustments`, 'adjustments', 2);
    expect(adjustments.rows.map((a) => a.reason)).toEqual(['Event 0 (test)', 'Event 1 (test)', 'Event 2 (test)']);
    expect((await walk(`/v1/meters/${meterId}/baselines`, 'baselines', 1)).rows).toEqual([]);
    const audit = await walk('/v1/audit', 'entries', 3);
    expect(audit.rows.map((e) => e.seq)).toEqual([...audit.rows.map((e) => e.seq)].sort((x, y) => x - y));
    expect(new Set(audit.rows.map((e) => e.seq)).size).toBe(audit.rows.length);
  });

  it('the OpenAPI document states limit (default and maximum) and cursor on every list that answers nextCursor', async () => {
    const document = (await api.call('GET', '/docs/json', { as: 'none' })).json;
    const lists: string[] = [];
    for (const [path, item] of Object.entries<any>(document.paths)) {
      const get = item.get;
      if (!get) continue;
      let schema = get.responses?.['200']?.content?.['application/json']?.schema;
      if (schema?.$ref) schema = document.components.schemas[schema.$ref.split('/').pop()];
      if (!schema?.properties?.nextCursor) continue;
      lists.push(path);
      const limit = get.parameters.find((p: any) => p.name === 'limit' && p.in === 'query');
      expect(limit?.schema?.default, path).toEqual(expect.any(Number));
      expect(limit?.schema?.maximum, path).toEqual(expect.any(Number));
      expect(
        get.parameters.some((p: any) => p.name === 'cursor' && p.in === 'query'),
        path,
      ).toBe(true);
    }
    // Every list of this service pages (a rate schedule is one document, replaced whole, at most 1,000 entries;
    // a baseline's candidates and a report's meters belong to their document).
    expect(lists.sort()).toEqual(
      [
        '/v1/api-keys',
        '/v1/audit',
        '/v1/audit/checkpoints',
        '/v1/facilities',
        '/v1/facilities/{id}/meters',
        '/v1/facilities/{id}/variables',
        '/v1/meters',
        '/v1/meters/{id}/adjustments',
        '/v1/meters/{id}/baselines',
        '/v1/meters/{id}/readings',
        '/v1/variables/{id}/values',
        '/v1/weather-stations',
        '/v1/weather-stations/{id}/observations',
      ].sort(),
    );
  });
});
