import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { makeTestApi, type TestApi } from '../support/api.js';
import { databaseDigest } from '../support/db-digest.js';
import { createFacility } from '../../src/services/facilities.js';
import { createMeter } from '../../src/services/meters.js';
import { parseApiKey } from '../../src/store/api-keys.js';
import { verifyAllAuditChains } from '../../src/store/audit.js';
import { insertBareBaseline } from '../support/baseline-rows.js';

// Check values: synthetic (the test sets the truth) unless a comment beside one names another source.
// Every name and scenario here is invented.

let api: TestApi;
let stationId: string;
let url: string;

async function makeStation(target: TestApi, temperatureUnit: 'F' | 'C'): Promise<string> {
  const station = await target.call('POST', '/v1/weather-stations', {
    body: { name: `Station S-${temperatureUnit} (invented)`, temperatureUnit },
  });
  return station.json.id;
}

/** A meter on the station with a baseline row written straight to the table (the baselines API is not under test here). */
async function frozenBaselineOn(
  target: TestApi,
  station: string,
  id: string,
  start: string,
  end: string,
): Promise<void> {
  const ctx = {
    store: target.store,
    principal: {
      keyId: parseApiKey(target.keys.admin)!.id,
      organisationId: target.organisationId,
      role: 'admin' as const,
    },
    now: '2026-01-01T00:00:00.000Z',
  };
  const facility = await createFacility(ctx, { name: 'School building B2 (invented)' });
  const meter = await createMeter(ctx, facility.id, {
    name: 'Gas',
    fuel: 'natural gas',
    unit: 'therm',
    weatherStationId: station,
  });
  await insertBareBaseline(target.store.db, {
    id,
    organisationId: target.organisationId,
    meterId: meter.id,
    start,
    end,
    status: 'frozen',
  });
}

async function refused(method: 'PUT' | 'GET', path: string, options: Parameters<TestApi['call']>[2]) {
  const before = await databaseDigest(api.store.db);
  const response = await api.call(method, path, options);
  expect(await databaseDigest(api.store.db)).toBe(before);
  return response;
}

beforeEach(async () => {
  api = await makeTestApi();
  stationId = await makeStation(api, 'F');
  url = `/v1/weather-stations/${stationId}/observations`;
});

afterEach(async () => {
  expect((await verifyAllAuditChains(api.store.db)).ok).toBe(true);
  await api.close();
});

describe('PUT /v1/weather-stations/{id}/observations', () => {
  it('stores means and min/max days from JSON and returns them by date', async () => {
    const put = await api.call('PUT', url, {
      body: {
        observations: [
          { date: '2025-01-03', temp: 28.4 },
          { date: '2025-01-01', tmin: 30, tmax: 45 },
          { date: '2025-01-02', temp: 33 },
        ],
      },
    });
    expect(put.status).toBe(200);
    expect(put.json).toEqual({ stationId, received: 3, created: 3, updated: 0, unchanged: 0 }); // synthetic: three new days

    const listed = await api.call('GET', url, { as: 'analyst' });
    expect(listed.status).toBe(200);
    expect(listed.json).toEqual({
      stationId,
      temperatureUnit: 'F',
      observations: [
        { date: '2025-01-01', temp: 37.5, tmin: 30, tmax: 45, filled: null, fillNote: null }, // hand-worked: (30 + 45) / 2, the common-practice daily mean
        { date: '2025-01-02', temp: 33, tmin: null, tmax: null, filled: null, fillNote: null },
        { date: '2025-01-03', temp: 28.4, tmin: null, tmax: null, filled: null, fillNote: null },
      ],
      limit: 1000, // the stated default page size
      nextCursor: null, // one page holds them all
    });
  });

  it('stores CSV in either layout', async () => {
    expect((await api.call('PUT', url, { csv: 'date,temp\n2025-01-01,41.2\n2025-01-02,39\n' })).json.created).toBe(2); // synthetic: two rows
    const put = await api.call('PUT', url, { csv: 'Date,TMin,TMax\n2025-01-03,20,31\n' });
    expect(put.status).toBe(200);
    const listed = await api.call('GET', url);
    expect(listed.json.observations[2]).toEqual({
      date: '2025-01-03',
      temp: 25.5,
      tmin: 20,
      tmax: 31,
      filled: null,
      fillNote: null,
    }); // hand-worked: (20 + 31) / 2
  });

  it('upserts by date: unchanged days store nothing, changed days are updated and audited compactly', async () => {
    const days = [
      { date: '2025-01-01', temp: 30 },
      { date: '2025-01-02', temp: 31 },
    ];
    await api.call('PUT', url, { body: { observations: days } });
    const same = await refused('PUT', url, { body: { observations: days } });
    expect(same.json).toEqual({ stationId, received: 2, created: 0, updated: 0, unchanged: 2 }); // synthetic: the same two days

    const changed = await api.call('PUT', url, {
      body: {
        observations: [
          { date: '2025-01-01', temp: 30 },
          { date: '2025-01-02', tmin: 25, tmax: 35 },
          { date: '2025-01-03', temp: 29 },
        ],
      },
    });
    expect(changed.json).toEqual({ stationId, received: 3, created: 1, updated: 1, unchanged: 1 }); // synthetic: one of each

    const rows = await api.store.db
      .selectFrom('audit_log')
      .selectAll()
      .where('action', '=', 'upsert-observations')
      .orderBy('seq')
      .execute();
    expect(rows).toHaveLength(2); // synthetic: the unchanged request wrote no audit row
    const last = rows[1]!;
    expect(last.entity_type).toBe('weather-station');
    expect(last.entity_id).toBe(stationId);
    expect(JSON.parse(last.before_json!)).toEqual({ '2025-01-02': { temp: 31 } });
    expect(JSON.parse(last.after_json!)).toEqual({
      '2025-01-02': { temp: 30, tmin: 25, tmax: 35 },
      '2025-01-03': { temp: 29 },
    }); // hand-worked mean (25 + 35) / 2
  });

  it.each([
    ['a date that is not a date', { date: '3 Jan 2025', temp: 30 }, 'observations[0].date'],
    ['an impossible date', { date: '2025-02-30', temp: 30 }, 'observations[0].date'],
    ['tmin above tmax', { date: '2025-01-01', tmin: 40, tmax: 30 }, 'observations[0].tmin'],
    ['tmin without tmax', { date: '2025-01-01', tmin: 30 }, 'observations[0].tmax'],
    ['no temperature', { date: '2025-01-01' }, 'observations[0].temp'],
    ['both forms at once', { date: '2025-01-01', temp: 30, tmin: 25, tmax: 35 }, 'observations[0].temp'],
    // From the engine's plausibility bound, −80…140 °F (common practice for input checks).
    ['an implausible mean', { date: '2025-01-01', temp: 141 }, 'observations[0].temp'],
    ['an implausible minimum', { date: '2025-01-01', tmin: -81, tmax: 10 }, 'observations[0].tmin'],
    ['a temperature sent as a string', { date: '2025-01-01', temp: '30' }, 'observations[0].temp'],
    ['an unknown field', { date: '2025-01-01', temp: 30, humidity: 80 }, 'observations[0]'],
  ])('refuses %s with a 400 naming the field', async (_what, observation, field) => {
    const response = await refused('PUT', url, { body: { observations: [observation] } });
    expect(response.status).toBe(400);
    expect(response.headers['content-type']).toMatch(/^application\/problem\+json/);
    expect(response.json.errors.map((e: { field: string }) => e.field)).toContain(field);
    expect(response.json.detail).toContain(field);
  });

  it('refuses a date repeated in one request, naming both records', async () => {
    const response = await refused('PUT', url, {
      body: {
        observations: [
          { date: '2025-01-01', temp: 30 },
          { date: '2025-01-01', temp: 31 },
        ],
      },
    });
    expect(response.status).toBe(400);
    expect(response.json.errors[0]).toEqual({
      field: 'observations[1].date',
      message: 'repeats the date 2025-01-01 (observations[0])',
    });
  });

  it("judges plausibility in the station's own unit", async () => {
    const celsius = `/v1/weather-stations/${await makeStation(api, 'C')}/observations`;
    // hand-worked: 140 °F = 60 °C, the engine's upper bound; 61 °C is past it, 59 °C inside.
    expect((await refused('PUT', celsius, { body: { observations: [{ date: '2025-07-01', temp: 61 }] } })).status).toBe(
      400,
    );
    expect(
      (await api.call('PUT', celsius, { body: { observations: [{ date: '2025-07-01', temp: 59 }] } })).status,
    ).toBe(200);
    // The same 61 is an ordinary summer day in °F.
    expect((await api.call('PUT', url, { body: { observations: [{ date: '2025-07-01', temp: 61 }] } })).status).toBe(
      200,
    );
  });

  it.each([
    ['an unknown column', 'date,temp,humidity\n2025-01-01,30,80\n', 'row 1'],
    ['a missing column', 'date,tmin\n2025-01-01,30\n', 'row 1'],
    ['an impossible date', 'date,temp\n2025-01-01,30\n2025-02-30,31\n', 'row 3, field date'],
    ['a temperature that is not a number', 'date,temp\n2025-01-01,30\n2025-01-02,31F\n', 'row 3, field temp'],
    ['an implausible temperature', 'date,temp\n2025-01-01,300\n', 'row 2, field temp'],
    ['tmin above tmax', 'date,tmin,tmax\n2025-01-01,30,20\n', 'row 2, field tmin'],
    ['a repeated date', 'date,temp\n2025-01-01,30\n2025-01-02,30\n2025-01-01,31\n', 'row 4, field date'],
  ])('refuses CSV with %s, naming the row', async (_what, csv, field) => {
    const response = await refused('PUT', url, { csv });
    expect(response.status).toBe(400);
    expect(response.json.errors[0].field).toBe(field);
    expect(response.json.detail).toContain(field.split(',')[0]);
  });

  it("answers 404 for another organisation's station", async () => {
    expect(
      (await refused('PUT', url, { as: 'other', body: { observations: [{ date: '2025-01-01', temp: 30 }] } })).status,
    ).toBe(404);
    expect((await api.call('GET', url, { as: 'other' })).status).toBe(404);
  });

  it('lets integration keys put and refuses analysts', async () => {
    const body = { observations: [{ date: '2025-01-01', temp: 30 }] };
    expect((await refused('PUT', url, { as: 'analyst', body })).status).toBe(403);
    expect((await api.call('PUT', url, { as: 'integration', body })).status).toBe(200);
    // Roles as src/domain/principal.ts grants them: integration keys lack 'read'.
    expect((await api.call('GET', url, { as: 'integration' })).status).toBe(403);
  });

  it('replays the first response for a repeated Idempotency-Key and stores nothing new', async () => {
    const headers = { 'idempotency-key': 'weather-feed-2025-01-01' };
    const body = { observations: [{ date: '2025-01-01', temp: 30 }] };
    const first = await api.call('PUT', url, { body, headers });
    const replay = await refused('PUT', url, { body, headers });
    expect(replay.status).toBe(200);
    expect(replay.headers['idempotent-replayed']).toBe('true');
    expect(replay.json).toEqual(first.json);
  });
});

describe('frozen baseline windows', () => {
  it('refuses days inside the window of a frozen baseline of a meter on the station, and accepts days outside', async () => {
    await frozenBaselineOn(api, stationId, 'bsl_school_2024', '2024-01-01', '2024-02-01');
    const inside = await refused('PUT', url, {
      body: {
        observations: [
          { date: '2024-02-01', temp: 30 },
          { date: '2024-01-31', tmin: 20, tmax: 30 },
        ],
      },
    });
    expect(inside.status).toBe(409);
    expect(inside.json.type).toBe('urn:mvledger:problem:frozen');
    expect(inside.json.detail).toContain('2024-01-31');
    expect(inside.json.detail).toContain('bsl_school_2024');
    // hand-worked: the window [2024-01-01, 2024-02-01) ends before 1 February.
    expect(
      (
        await api.call('PUT', url, {
          body: {
            observations: [
              { date: '2024-02-01', temp: 30 },
              { date: '2023-12-31', temp: 30 },
            ],
          },
        })
      ).status,
    ).toBe(200);
  });

  it('refuses changing a stored day inside the window but accepts re-sending it unchanged', async () => {
    const day = { date: '2024-01-10', temp: 25 };
    await api.call('PUT', url, { body: { observations: [day] } });
    await frozenBaselineOn(api, stationId, 'bsl_school_2024', '2024-01-01', '2024-02-01');
    expect((await refused('PUT', url, { body: { observations: [{ ...day, temp: 26 }] } })).status).toBe(409);
    const same = await api.call('PUT', url, { body: { observations: [day] } });
    expect(same.json.unchanged).toBe(1); // synthetic: nothing changed
  });

  it('ignores baselines of meters on other stations', async () => {
    const elsewhere = await makeStation(api, 'F');
    await frozenBaselineOn(api, elsewhere, 'bsl_elsewhere', '2024-01-01', '2024-02-01');
    expect((await api.call('PUT', url, { body: { observations: [{ date: '2024-01-10', temp: 25 }] } })).status).toBe(
      200,
    );
  });
});

describe('GET /v1/weather-stations/{id}/observations', () => {
  it('returns the days in [from, to)', async () => {
    await api.call('PUT', url, { csv: 'date,temp\n2025-01-01,30\n2025-01-02,31\n2025-01-03,32\n' });
    const listed = await api.call('GET', `${url}?from=2025-01-02&to=2025-01-03`);
    expect(listed.json.observations.map((o: { date: string }) => o.date)).toEqual(['2025-01-02']); // synthetic: `to` is exclusive
  });
});
