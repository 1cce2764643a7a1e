/**
 * The problem+json bodies of a representative set of failing requests, one or
 * more per kind a service raises (not found, invalid, conflict, frozen,
 * unprocessable) and the ones the HTTP layer raises itself (unauthorized,
 * forbidden, schema validation). Check values: the service's own answers,
 * recorded once in fixtures/problem-bodies.json before the services moved
 * from the HTTP Problem type to the transport-free DomainError; the bodies
 * must stay byte-for-byte what clients saw (ids replaced by placeholders).
 * Rewrite the fixture only on purpose: UPDATE_PROBLEM_FIXTURE=1.
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { afterAll, beforeAll, expect, it } from 'vitest';
import { makeTestApi, type CallOptions, type TestApi } from '../support/api.js';
import { CLIMATES, SAMPLE_BUILDING, dailyWeather, monthlyReadings, seededRandom } from '../support/synthetic.js';

const FIXTURE = new URL('./fixtures/problem-bodies.json', import.meta.url);

// synthetic: the test sets the truth. An invented building, 24 monthly bills.
const random = seededRandom(41);
const WEATHER = dailyWeather(CLIMATES.temperate, '2023-01-01', 760, random);
const BILLS = monthlyReadings(SAMPLE_BUILDING, WEATHER, '2023-01-01', 24, random);

let api: TestApi;
const ids = new Map<string, string>();
const remember = (id: string, name: string): string => (ids.set(id, `<${name}>`), id);

function normalise(value: unknown): unknown {
  let text = JSON.stringify(value);
  for (const [id, name] of ids) text = text.split(id).join(name);
  return JSON.parse(text);
}

const requests: {
  name: string;
  method: 'GET' | 'POST' | 'PUT' | 'DELETE';
  url: () => string;
  options?: () => CallOptions;
}[] = [];
let m = '';
let bare = '';
let station = '';
let facility = '';
let frozen = '';
let adjustment = '';
let adminKeyId = '';

beforeAll(async () => {
  api = await makeTestApi();
  station = remember(
    (await api.call('POST', '/v1/weather-stations', { body: { name: 'Invented vale station', temperatureUnit: 'F' } }))
      .json.id,
    'station',
  );
  await api.call('PUT', `/v1/weather-stations/${station}/observations`, {
    body: { observations: WEATHER.map((d) => ({ date: d.date, temp: d.temp })) },
  });
  facility = remember(
    (await api.call('POST', '/v1/facilities', { body: { name: 'Invented depot' } })).json.id,
    'facility',
  );
  const meterBody = { name: 'Invented main', fuel: 'electricity', unit: 'kWh', weatherStationId: station };
  m = remember((await api.call('POST', `/v1/facilities/${facility}/meters`, { body: meterBody })).json.id, 'meter');
  bare = remember(
    (await api.call('POST', `/v1/facilities/${facility}/meters`, { body: meterBody })).json.id,
    'bare-meter',
  );
  await api.call('POST', `/v1/meters/${m}/readings`, {
    body: { readings: BILLS.map((r) => ({ start: r.start, end: r.end, quantity: r.quantity })) },
  });
  await api.call('POST', `/v1/meters/${bare}/readings`, {
    body: { readings: BILLS.slice(0, 3).map((r) => ({ start: r.start, end: r.end, quantity: r.quantity })) },
  });
  frozen = remember(
    (await api.call('POST', `/v1/meters/${m}/baselines`, { body: { start: '2023-01-01', end: '2025-01-01' } })).json.id,
    'baseline',
  );
  remember(
    (await api.call('POST', `/v1/baselines/${frozen}/freeze`, { body: { note: 'Agreed (test)' } })).json.contentHash,
    'content-hash',
  );
  adjustment = remember(
    (
      await api.call('POST', `/v1/meters/${m}/adjustments`, {
        body: { start: '2025-03-01', end: '2025-04-01', quantity: 100, reason: 'Invented wing closed' },
      })
    ).json.id,
    'adjustment',
  );
  await api.call('POST', `/v1/adjustments/${adjustment}/withdraw`, { body: { reason: 'Entered twice' } });
  remember(
    (
      await api.call('POST', `/v1/meters/${m}/adjustments`, {
        body: { start: '2025-05-01', end: '2025-06-01', perDay: 2, reason: 'Invented wing closed' },
      })
    ).json.id,
    'live-adjustment',
  );
  const keys = (await api.call('GET', '/v1/api-keys')).json;
  const list = Array.isArray(keys) ? keys : keys.keys;
  for (const key of list) remember(key.id, `key-${key.role}`);
  adminKeyId = list.find((k: { role: string }) => k.role === 'admin').id;
});
afterAll(async () => api.close());

requests.push(
  { name: 'facility not found', method: 'GET', url: () => '/v1/facilities/fac_missing' },
  { name: 'meter not found (savings)', method: 'GET', url: () => '/v1/meters/mtr_missing/savings' },
  { name: 'baseline not found', method: 'GET', url: () => '/v1/baselines/bsl_missing' },
  { name: 'station not found', method: 'GET', url: () => '/v1/weather-stations/wst_missing' },
  { name: 'no key', method: 'GET', url: () => '/v1/facilities', options: () => ({ as: 'none' }) },
  {
    name: 'role lacks permission',
    method: 'POST',
    url: () => '/v1/facilities',
    options: () => ({ as: 'analyst', body: { name: 'X' } }),
  },
  { name: 'schema: facility without name', method: 'POST', url: () => '/v1/facilities', options: () => ({ body: {} }) },
  {
    name: 'meter with an unknown station',
    method: 'POST',
    url: () => `/v1/facilities/${facility}/meters`,
    options: () => ({ body: { name: 'Y', fuel: 'electricity', unit: 'kWh', weatherStationId: 'wst_missing' } }),
  },
  {
    name: 'readings overlap stored ones',
    method: 'POST',
    url: () => `/v1/meters/${m}/readings`,
    options: () => ({ body: { readings: [{ start: '2023-01-05', end: '2023-02-05', quantity: 10 }] } }),
  },
  {
    name: 'readings: empty batch',
    method: 'POST',
    url: () => `/v1/meters/${m}/readings`,
    options: () => ({ body: { readings: [] } }),
  },
  { name: 'readings query: bad date', method: 'GET', url: () => `/v1/meters/${m}/readings?from=2023-02-30` },
  {
    name: 'readings query: to before from',
    method: 'GET',
    url: () => `/v1/meters/${m}/readings?from=2024-01-01&to=2023-01-01`,
  },
  {
    name: 'baseline window backwards',
    method: 'POST',
    url: () => `/v1/meters/${m}/baselines`,
    options: () => ({ body: { start: '2024-01-01', end: '2023-01-01' } }),
  },
  {
    name: 'baseline with too few bills',
    method: 'POST',
    url: () => `/v1/meters/${bare}/baselines`,
    options: () => ({ body: { start: '2023-01-01', end: '2023-02-01' } }),
  },
  {
    name: 'choose on a frozen baseline',
    method: 'POST',
    url: () => `/v1/baselines/${frozen}/choose`,
    options: () => ({ body: { model: '3PH', reason: 'Engineer review (test)' } }),
  },
  {
    name: 'freeze a frozen baseline',
    method: 'POST',
    url: () => `/v1/baselines/${frozen}/freeze`,
    options: () => ({ body: { note: 'again' } }),
  },
  { name: 'savings without a frozen baseline', method: 'GET', url: () => `/v1/meters/${bare}/savings` },
  {
    name: 'withdraw a withdrawn adjustment',
    method: 'POST',
    url: () => `/v1/adjustments/${adjustment}/withdraw`,
    options: () => ({ body: { reason: 'Entered twice' } }),
  },
  {
    name: 'adjustment with quantity and perDay',
    method: 'POST',
    url: () => `/v1/meters/${m}/adjustments`,
    options: () => ({
      body: { start: '2024-03-01', end: '2024-04-01', quantity: 100, perDay: 3, reason: 'Both given' },
    }),
  },
  {
    name: 'adjustment inside the baseline',
    method: 'POST',
    url: () => `/v1/meters/${m}/adjustments`,
    options: () => ({ body: { start: '2024-03-01', end: '2024-04-01', quantity: 100, reason: 'Too early' } }),
  },
  {
    name: 'adjustment without a frozen baseline',
    method: 'POST',
    url: () => `/v1/meters/${bare}/adjustments`,
    options: () => ({ body: { start: '2025-03-01', end: '2025-04-01', quantity: 100, reason: 'No baseline' } }),
  },
  {
    name: 'adjustment overlapping another',
    method: 'POST',
    url: () => `/v1/meters/${m}/adjustments`,
    options: () => ({ body: { start: '2025-05-15', end: '2025-07-01', quantity: 100, reason: 'Overlaps' } }),
  },
  {
    name: 'readings CSV with a bad row',
    method: 'POST',
    url: () => `/v1/meters/${m}/readings`,
    options: () => ({ csv: 'start,end,quantity\n2026-01-01,2026-02-01,abc\n' }),
  },
  {
    name: 'rates with a gap',
    method: 'PUT',
    url: () => `/v1/meters/${m}/rates`,
    options: () => ({
      body: {
        currency: 'USD',
        rates: [
          { from: '2023-01-01', to: '2023-06-01', price: 0.1 },
          { from: '2023-07-01', to: '2023-08-01', price: 0.1 },
          { from: '2023-07-15', price: 0.1 },
        ],
      },
    }),
  },
  {
    name: 'contract guarantee beyond its years',
    method: 'PUT',
    url: () => `/v1/facilities/${facility}/contract`,
    options: () => ({
      body: {
        start: '2025-01-01',
        years: 2,
        energyUnit: 'kWh',
        guarantees: [{ year: 3, energy: 10 }, { year: 1 }, { year: 1, cost: 5 }],
      },
    }),
  },
  {
    name: 'contract with an unknown energy unit',
    method: 'PUT',
    url: () => `/v1/facilities/${facility}/contract`,
    options: () => ({ body: { start: '2025-01-01', years: 2, energyUnit: 'furlong', guarantees: [] } }),
  },
  {
    name: 'normal year with missing days',
    method: 'PUT',
    url: () => `/v1/weather-stations/${station}/normal-year`,
    options: () => ({
      body: {
        source: 'Invented normals',
        days: [
          { day: '01-01', temp: 40 },
          { day: '02-30', temp: 40 },
        ],
      },
    }),
  },
  {
    name: 'observations out of range',
    method: 'PUT',
    url: () => `/v1/weather-stations/${station}/observations`,
    options: () => ({
      body: {
        observations: [
          { date: '2030-01-01', temp: 400 },
          { date: '2030-01-02', temp: -400 },
        ],
      },
    }),
  },
  { name: 'revoke the calling key', method: 'DELETE', url: () => `/v1/api-keys/${adminKeyId}` },
  { name: 'report: no window', method: 'GET', url: () => '/v1/reports/savings' },
  {
    name: 'report: quarter and range',
    method: 'GET',
    url: () => '/v1/reports/savings?quarter=2024-Q1&from=2024-01-01&to=2024-02-01',
  },
  { name: 'report: range backwards', method: 'GET', url: () => '/v1/reports/savings?from=2024-02-01&to=2024-01-01' },
  { name: 'report: contract year without a contract', method: 'GET', url: () => '/v1/reports/savings?contractYear=1' },
  {
    name: 'report: unknown facility',
    method: 'GET',
    url: () => '/v1/reports/savings?quarter=2024-Q1&facilityId=fac_missing',
  },
);

it('answers each failing request with the same problem+json body as before', async () => {
  const actual: Record<string, { status: number; body: unknown }> = {};
  for (const request of requests) {
    const response = await api.call(request.method, request.url(), request.options?.() ?? {});
    expect(response.headers['content-type'], request.name).toMatch(/^application\/problem\+json/); // RFC 9457 §3
    actual[request.name] = { status: response.status, body: normalise(response.json) };
  }
  if (process.env.UPDATE_PROBLEM_FIXTURE === '1') writeFileSync(FIXTURE, `${JSON.stringify(actual, null, 2)}\n`);
  const expected = JSON.parse(readFileSync(FIXTURE, 'utf8'));
  expect(actual).toEqual(expected); // recorded from the service before the refactor
});
