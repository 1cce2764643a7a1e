/**
 * The audit trail as the proof of the tables: GET /v1/audit/verify?depth=full
 * replays the organisation's trail and names every stored row that differs
 * from it; every frozen baseline is compared with the hash its freeze row
 * recorded. The tamper cases edit the database directly, as someone with
 * database access (and not the service) would, and each edit is undone
 * before the next. Check values: the service's own writes (synthetic data,
 * the test sets the truth) and the edit each case makes.
 */
import { storedModelHash } from '../../src/services/frozen-models.js';
import { sql } from 'kysely';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { NORMAL_YEAR_DAYS } from '../../src/engine/index.js';
import { baselineContentHash } from '../../src/store/baseline-content.js';
import { makeTestApi, type TestApi } from '../support/api.js';
import { CLIMATES, SAMPLE_BUILDING, dailyWeather, monthlyReadings, seededRandom } from '../support/synthetic.js';

// synthetic: the test sets the truth. 24 baseline bills, then 6 reporting bills.
const random = seededRandom(17);
const WEATHER = dailyWeather(CLIMATES.temperate, '2023-01-01', 920, random);
const BILLS = monthlyReadings(SAMPLE_BUILDING, WEATHER, '2023-01-01', 30, random);

let api: TestApi;
let meterId: string;
let stationId: string;
let variableId: string;
let facilityId: string;
let baselineId: string;

async function ok(method: 'GET' | 'POST' | 'PUT', path: string, body?: unknown) {
  const response = await api.call(method, path, body === undefined ? {} : { body });
  expect(response.status, `${method} ${path}: ${response.text}`).toBeLessThan(300);
  return response.json;
}

const verify = async (depth: 'chain' | 'full' = 'full') =>
  (await api.call('GET', `/v1/audit/verify?depth=${depth}`, { as: 'analyst' })).json;

/** Run `edit`, expect full verification to name it, undo it, expect it clean again. */
async function expectNamed(edit: string, undo: string, table: string, words: RegExp): Promise<void> {
  await sql.raw(edit).execute(api.store.db);
  try {
    const verdict = await verify();
    expect(verdict.ok).toBe(false);
    const differences = [...verdict.baselines.differences, ...verdict.replay.differences];
    expect(
      differences.some(
        (d: { table: string; difference: string; key: string }) =>
          d.table === table && words.test(`${d.key} ${d.difference}`),
      ),
      JSON.stringify(differences),
    ).toBe(true);
  } finally {
    await sql.raw(undo).execute(api.store.db);
  }
  expect((await verify()).ok).toBe(true);
}

beforeAll(async () => {
  api = await makeTestApi();
  stationId = (await ok('POST', '/v1/weather-stations', { name: 'Invented ridge station', temperatureUnit: 'F' })).id;
  // A three-day hole in the record, filled on record by interpolation.
  const observed = WEATHER.filter((d) => !['2023-03-10', '2023-03-11'].includes(d.date));
  await ok('PUT', `/v1/weather-stations/${stationId}/observations`, {
    observations: observed.map((d) => ({ date: d.date, temp: d.temp })),
  });
  await ok('POST', `/v1/weather-stations/${stationId}/gap-fills`, { from: '2023-01-01', to: '2023-12-31' });
  facilityId = (await ok('POST', '/v1/facilities', { name: 'Proof test depot (invented)' })).id;
  meterId = (
    await ok('POST', `/v1/facilities/${facilityId}/meters`, {
      name: 'Depot gas (invented)',
      fuel: 'natural-gas',
      unit: 'therm',
      weatherStationId: stationId,
    })
  ).id;
  await ok('POST', `/v1/meters/${meterId}/readings`, {
    readings: BILLS.map((r) => ({ start: r.start, end: r.end, quantity: r.quantity })),
  });
  // A correction: the trail keeps its new values.
  const last = BILLS[BILLS.length - 1]!;
  await ok('POST', `/v1/meters/${meterId}/readings`, {
    readings: [{ start: last.start, end: last.end, quantity: last.quantity + 10 }],
    correctionReason: 'Meter re-read (test)',
  });
  const draft = await ok('POST', `/v1/meters/${meterId}/baselines`, { start: '2023-01-01', end: '2025-01-01' });
  baselineId = (await ok('POST', `/v1/baselines/${draft.id}/freeze`, { note: 'Agreed (test)' })).id;
  await ok('PUT', `/v1/meters/${meterId}/rates`, { currency: 'USD', rates: [{ from: '2025-01-01', price: 1.1 }] });
  await ok('PUT', `/v1/facilities/${facilityId}/contract`, {
    start: '2025-01-01',
    years: 2,
    currency: 'USD',
    energyUnit: 'therm',
    guarantees: [{ year: 1, energy: 100, cost: 110 }],
  });
  const adjustment = await ok('POST', `/v1/meters/${meterId}/adjustments`, {
    start: '2025-02-01',
    end: '2025-03-01',
    quantity: 40,
    reason: 'Temporary kiln (test)',
  });
  await ok('POST', `/v1/adjustments/${adjustment.id}/withdraw`, { reason: 'Recorded in error (test)' });
  await ok('PUT', `/v1/weather-stations/${stationId}/normal-year`, {
    source: 'Invented normal year (test)',
    days: NORMAL_YEAR_DAYS.map((day, i) => ({ day, temp: 50 + 20 * Math.sin(i / 58) })),
  });
  variableId = (
    await ok('POST', `/v1/facilities/${facilityId}/variables`, {
      name: 'people',
      unit: 'people',
      kind: 'daily',
      aggregation: 'mean',
    })
  ).id;
  await ok('POST', `/v1/variables/${variableId}/values`, {
    values: [
      { date: '2025-02-03', value: 12 },
      { date: '2025-02-04', value: 14 },
    ],
  });
  await ok('POST', `/v1/variables/${variableId}/values`, {
    values: [{ date: '2025-02-04', value: 15 }],
    correctionReason: 'Recount (test)',
  });
  await ok('PUT', `/v1/facilities/${facilityId}/calendar`, {
    dayTypes: ['open', 'closed'],
    weekly: ['open', 'open', 'open', 'open', 'open', 'closed', 'closed'],
    exceptions: [],
  });
});
afterAll(async () => api.close());

describe('full verification', () => {
  it('finds every table as the trail wrote it', async () => {
    const verdict = await verify();
    expect(verdict.ok, JSON.stringify(verdict.replay.differences)).toBe(true);
    expect(verdict.baselines).toEqual({ ok: true, checked: 1, differences: [] });
    // rows the setup wrote (synthetic: the test sets the truth)
    expect(verdict.replay.compared).toMatchObject({
      readings: 30,
      observations: 920,
      rates: 1,
      contracts: 1,
      'normal-years': 1,
      adjustments: 1,
      variables: 1,
      'variable-values': 2,
      calendars: 1,
    });
    expect(verdict.replay.compared['api-keys']).toBeGreaterThanOrEqual(4);
  });

  it('checks the chain and the frozen baselines at the default depth, without the replay', async () => {
    const verdict = await verify('chain');
    expect(verdict.ok).toBe(true);
    expect(verdict.baselines.checked).toBe(1);
    expect(verdict.replay).toBeUndefined();
  });

  it('names a reading edited in place (inside the frozen window)', async () => {
    const bill = BILLS[3]!;
    await expectNamed(
      `update readings set quantity = quantity + 1 where meter_id = '${meterId}' and period_start = '${bill.start}'`,
      `update readings set quantity = quantity - 1 where meter_id = '${meterId}' and period_start = '${bill.start}'`,
      'readings',
      new RegExp(`${bill.start}.*quantity`),
    );
  });

  it('names a reading deleted and a reading added without the service', async () => {
    const bill = BILLS[5]!;
    const row = await api.store.db
      .selectFrom('readings')
      .selectAll()
      .where('meter_id', '=', meterId)
      .where('period_start', '=', bill.start)
      .executeTakeFirstOrThrow();
    await api.store.db
      .deleteFrom('readings')
      .where('meter_id', '=', meterId)
      .where('period_start', '=', bill.start)
      .execute();
    let verdict = await verify();
    expect(verdict.replay.differences).toContainEqual({
      table: 'readings',
      key: `meter ${meterId} ${bill.start}..${bill.end}`,
      difference: 'written on the audit trail, but missing from the table',
    });
    await api.store.db.insertInto('readings').values(row).execute();
    await api.store.db
      .insertInto('readings')
      .values({ ...row, period_start: '2030-01-01', period_end: '2030-02-01' })
      .execute();
    verdict = await verify();
    expect(verdict.replay.differences).toContainEqual({
      table: 'readings',
      key: `meter ${meterId} 2030-01-01..2030-02-01`,
      difference: 'stored, but no audit row wrote it',
    });
    await api.store.db
      .deleteFrom('readings')
      .where('meter_id', '=', meterId)
      .where('period_start', '=', '2030-01-01')
      .execute();
    expect((await verify()).ok).toBe(true);
  });

  it('names an observed and a filled weather day edited', async () => {
    await expectNamed(
      `update weather_observations set temp = temp + 0.5 where station_id = '${stationId}' and date = '2023-06-01'`,
      `update weather_observations set temp = temp - 0.5 where station_id = '${stationId}' and date = '2023-06-01'`,
      'observations',
      /2023-06-01.*temp/,
    );
    await expectNamed(
      `update weather_observations set fill_method = null where station_id = '${stationId}' and date = '2023-03-10'`,
      `update weather_observations set fill_method = 'interpolation' where station_id = '${stationId}' and date = '2023-03-10'`,
      'observations',
      /2023-03-10.*fill/,
    );
  });

  it('names a variable, its value and a calendar edited', async () => {
    await expectNamed(
      `update variables set aggregation = 'total' where id = '${variableId}'`,
      `update variables set aggregation = 'mean' where id = '${variableId}'`,
      'variables',
      new RegExp(variableId),
    );
    await expectNamed(
      `update variable_values set value = 16 where variable_id = '${variableId}' and period_start = '2025-02-04'`,
      `update variable_values set value = 15 where variable_id = '${variableId}' and period_start = '2025-02-04'`,
      'variable-values',
      /value: 16 stored, 15 on the audit trail/,
    );
    await expectNamed(
      `update facility_calendars set calendar_json = replace(calendar_json, '"exceptions":[]', '"exceptions":[{"dayType":"closed","end":"2025-01-02","start":"2025-01-01"}]') where facility_id = '${facilityId}'`,
      `update facility_calendars set calendar_json = replace(calendar_json, '"exceptions":[{"dayType":"closed","end":"2025-01-02","start":"2025-01-01"}]', '"exceptions":[]') where facility_id = '${facilityId}'`,
      'calendars',
      new RegExp(facilityId),
    );
  });

  it('names a rate, a contract guarantee, an adjustment, a normal year and a key role edited', async () => {
    await expectNamed(
      `update rates set price = 0.9 where meter_id = '${meterId}'`,
      `update rates set price = 1.1 where meter_id = '${meterId}'`,
      'rates',
      /1\.1/,
    );
    await expectNamed(
      `update contracts set guarantees_json = replace(guarantees_json, '110', '90') where facility_id = '${facilityId}'`,
      `update contracts set guarantees_json = replace(guarantees_json, '90', '110') where facility_id = '${facilityId}'`,
      'contracts',
      new RegExp(facilityId),
    );
    const withdrawnAt = (
      await api.store.db
        .selectFrom('adjustments')
        .select('withdrawn_at')
        .where('meter_id', '=', meterId)
        .executeTakeFirstOrThrow()
    ).withdrawn_at;
    expect(withdrawnAt).not.toBeNull();
    await expectNamed(
      `update adjustments set withdrawn_at = null where meter_id = '${meterId}'`,
      `update adjustments set withdrawn_at = '${withdrawnAt}' where meter_id = '${meterId}'`,
      'adjustments',
      /withdrawn/,
    );
    await expectNamed(
      `update normal_years set source = 'Another source' where station_id = '${stationId}'`,
      `update normal_years set source = 'Invented normal year (test)' where station_id = '${stationId}'`,
      'normal-years',
      /source/,
    );
    const analyst = await api.store.db
      .selectFrom('api_keys')
      .select('id')
      .where('organisation_id', '=', api.organisationId)
      .where('role', '=', 'analyst')
      .executeTakeFirstOrThrow();
    await expectNamed(
      `update api_keys set role = 'admin' where id = '${analyst.id}'`,
      `update api_keys set role = 'analyst' where id = '${analyst.id}'`,
      'api-keys',
      new RegExp(analyst.id),
    );
  });

  it('names a frozen baseline edited with its content hash recomputed, at every depth', async () => {
    const row = await api.store.db
      .selectFrom('baselines')
      .selectAll()
      .where('id', '=', baselineId)
      .executeTakeFirstOrThrow();
    const edited = { ...row, choice_reason: `${row.choice_reason ?? ''} (edited)` };
    const rehashed = baselineContentHash(edited);
    await api.store.db
      .updateTable('baselines')
      .set({ choice_reason: edited.choice_reason, content_hash: rehashed })
      .where('id', '=', baselineId)
      .execute();
    try {
      for (const depth of ['chain', 'full'] as const) {
        const verdict = await verify(depth);
        expect(verdict.ok).toBe(false);
        expect(verdict.baselines.differences).toEqual([
          {
            table: 'baselines',
            key: `baseline ${baselineId}`,
            difference: `its content hash ${rehashed} is not the hash ${row.content_hash} recorded when it was frozen (the content was edited and the hash recomputed)`,
          },
        ]);
      }
      // Without the hash recomputed, the stored hash no longer matches the content.
      await api.store.db
        .updateTable('baselines')
        .set({ content_hash: row.content_hash })
        .where('id', '=', baselineId)
        .execute();
      expect((await verify('chain')).baselines.differences[0].difference).toMatch(
        /^its stored content gives hash [0-9a-f]{64}, not its stored content hash/,
      );
    } finally {
      await api.store.db
        .updateTable('baselines')
        .set({ choice_reason: row.choice_reason, content_hash: row.content_hash })
        .where('id', '=', baselineId)
        .execute();
    }
    expect((await verify()).ok).toBe(true);
  });

  it('names a frozen baseline’s compact stored model edited behind the API, with or without its hash recomputed', async () => {
    const stored = await api.store.db
      .selectFrom('frozen_models')
      .selectAll()
      .where('baseline_id', '=', baselineId)
      .executeTakeFirstOrThrow();
    const text = stored.model_json.replace('"minCoverage":', '"minCoverage":0.5,"was":');
    expect(text).not.toBe(stored.model_json);
    try {
      await api.store.db
        .updateTable('frozen_models')
        .set({ model_json: text })
        .where('baseline_id', '=', baselineId)
        .execute();
      let verdict = await verify('chain');
      expect(verdict.ok).toBe(false);
      expect(verdict.baselines.differences).toEqual([
        {
          table: 'frozen_models',
          key: `baseline ${baselineId}`,
          difference: expect.stringMatching(/no longer matches its own hash/),
        },
      ]);
      await api.store.db
        .updateTable('frozen_models')
        .set({ model_hash: storedModelHash(stored.content_hash, stored.format, text) })
        .where('baseline_id', '=', baselineId)
        .execute();
      verdict = await verify('chain');
      expect(verdict.baselines.differences[0].difference).toMatch(
        /hash was recomputed to match: reports project with it/,
      );
    } finally {
      await api.store.db
        .updateTable('frozen_models')
        .set({ model_json: stored.model_json, model_hash: stored.model_hash })
        .where('baseline_id', '=', baselineId)
        .execute();
    }
    expect((await verify()).ok).toBe(true);
  });

  it('refuses an unknown depth, naming the field', async () => {
    const response = await api.call('GET', '/v1/audit/verify?depth=deep', { as: 'analyst' });
    expect(response.status).toBe(400);
    expect(response.text).toContain('depth');
  });
});
