/**
 * A reporting window whose readings have no weather. Check values:
 * synthetic (the test sets which days have weather).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApi, type TestApi } from '../support/api.js';
import { databaseDigest } from '../support/db-digest.js';
import { CLIMATES, SAMPLE_BUILDING, dailyWeather, monthlyReadings, seededRandom } from '../support/synthetic.js';

const random = seededRandom(77);
const WEATHER = dailyWeather(CLIMATES.temperate, '2023-01-01', 1096, random);
const BASELINE = monthlyReadings(SAMPLE_BUILDING, WEATHER, '2023-01-01', 24, random);
const REPORTING = monthlyReadings(SAMPLE_BUILDING, WEATHER, '2025-01-01', 3, random);
// Weather is posted for the baseline years only: 2025-01-01..2025-04-01 has none.
const POSTED_WEATHER = WEATHER.filter((d) => d.date < '2025-01-01');

let api: TestApi;
let meterId: string;
let stationId: string;

async function ok(
  method: 'POST' | 'PUT',
  url: string,
  body: unknown,
  status = method === 'POST' ? 201 : 200,
): Promise<any> {
  const reply = await api.call(method, url, { as: 'engineer', body });
  expect(reply.status, `${method} ${url}: ${reply.text}`).toBe(status);
  return reply.json;
}

beforeAll(async () => {
  api = await makeTestApi();
  stationId = (await ok('POST', '/v1/weather-stations', { name: 'Invented valley station', temperatureUnit: 'F' })).id;
  await ok('PUT', `/v1/weather-stations/${stationId}/observations`, { observations: POSTED_WEATHER });
  const facility = (await ok('POST', '/v1/facilities', { name: 'Invented depot' })).id;
  meterId = (
    await ok('POST', `/v1/facilities/${facility}/meters`, {
      name: 'Depot electric',
      fuel: 'electricity',
      unit: 'kWh',
      weatherStationId: stationId,
    })
  ).id;
  await ok('POST', `/v1/meters/${meterId}/readings`, {
    readings: [...BASELINE, ...REPORTING].map(({ start, end, quantity }) => ({ start, end, quantity })),
  });
  const draft = await ok('POST', `/v1/meters/${meterId}/baselines`, { start: '2023-01-01', end: '2025-01-01' });
  await ok('POST', `/v1/baselines/${draft.id}/freeze`, { note: 'Agreed (test)' }, 200);
});
afterAll(async () => {
  await api.close();
});

describe('a window whose readings lack weather answered 422 "no reporting data"', () => {
  it('names the missing weather dates and the station in the report’s 422', async () => {
    const before = await databaseDigest(api.store.db);
    const reply = await api.call('GET', '/v1/reports/savings?quarter=2025-Q1', { as: 'analyst' });
    expect(reply.status).toBe(422);
    expect(reply.headers['content-type']).toMatch(/problem\+json/);
    expect(reply.json.detail).toContain(
      `missing weather for dates 2025-01-01..2025-04-01 (90 days) at weather station ${stationId}`,
    ); // synthetic
    expect(reply.json.errors[0]).toMatchObject({
      field: expect.stringContaining(meterId),
      message: expect.stringMatching(/^missing weather/),
    });
    expect(await databaseDigest(api.store.db)).toBe(before);
  });

  it('names them in the meter savings 422 too', async () => {
    const reply = await api.call('GET', `/v1/meters/${meterId}/savings?from=2025-01-01&to=2025-04-01`, {
      as: 'analyst',
    });
    expect(reply.status).toBe(422);
    expect(reply.json.detail).toContain(
      `missing weather for dates 2025-01-01..2025-04-01 (90 days) at weather station ${stationId}`,
    ); // synthetic
  });
});
