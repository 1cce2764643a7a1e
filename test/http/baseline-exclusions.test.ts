/**
 * The engineer's exclusions over HTTP: readings left out of a baseline fit
 * by id or by period, each with its reason; listed apart from the coverage
 * exclusions, frozen with the baseline, and refused (nothing stored) when a
 * reading does not exist, a reason is missing, or more than a fifth would
 * go. Check values: the engine's own fit of the remaining readings (the same
 * document), the API contract, and hand-worked counts (24 bills: 4 may go,
 * 5 may not; the limit of a fifth is our own).
 */
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { analyseBaseline } from '../../src/engine/index.js';
import { makeTestApi, type TestApi } from '../support/api.js';
import { databaseDigest } from '../support/db-digest.js';
import { CLIMATES, SAMPLE_BUILDING, dailyWeather, monthlyReadings, seededRandom } from '../support/synthetic.js';

// synthetic: the test sets the truth.
const random = seededRandom(23);
const WEATHER = dailyWeather(CLIMATES.temperate, '2023-01-01', 800, random);
const BASELINE = monthlyReadings(SAMPLE_BUILDING, WEATHER, '2023-01-01', 24, random);
const WINDOW = { start: '2023-01-01', end: '2025-01-01' };

let api: TestApi;

beforeAll(async () => {
  api = await makeTestApi();
});
afterAll(async () => {
  await api.close();
});

async function seedMeter(): Promise<string> {
  const station = await api.call('POST', '/v1/weather-stations', {
    as: 'engineer',
    body: { name: 'Invented ridge station', temperatureUnit: 'F' },
  });
  const observations = WEATHER.map((d) => ({ date: d.date, temp: d.temp }));
  await api.call('PUT', `/v1/weather-stations/${station.json.id}/observations`, {
    as: 'integration',
    body: { observations },
  });
  const facility = await api.call('POST', '/v1/facilities', {
    as: 'engineer',
    body: { name: 'Test hall 3 (invented)' },
  });
  const meter = await api.call('POST', `/v1/facilities/${facility.json.id}/meters`, {
    as: 'engineer',
    body: { name: 'Hall gas (invented)', fuel: 'natural-gas', unit: 'kWh', weatherStationId: station.json.id },
  });
  const readings = BASELINE.map((r) => ({ start: r.start, end: r.end, quantity: r.quantity }));
  expect(
    (await api.call('POST', `/v1/meters/${meter.json.id}/readings`, { as: 'integration', body: { readings } })).status,
  ).toBe(201);
  return meter.json.id;
}

describe('exclusions when fitting a baseline (POST /v1/meters/{id}/baselines)', () => {
  it('leaves the named readings out, lists them apart, fits as the engine fits the rest, and keeps them when frozen', async () => {
    const meterId = await seedMeter();
    const listed = await api.call('GET', `/v1/meters/${meterId}/readings`, { as: 'analyst' });
    const [first, second] = [listed.json.readings[3], listed.json.readings[10]];
    expect(first.id).toBe(`${first.start}..${first.end}`);
    const response = await api.call('POST', `/v1/meters/${meterId}/baselines`, {
      as: 'engineer',
      body: {
        ...WINDOW,
        exclusions: [
          { readingId: first.id, reason: 'meter fault: register stuck for nine days' },
          { start: second.start, end: second.end, reason: 'estimated read, corrected on the next bill' },
        ],
      },
    });
    expect(response.status).toBe(201);
    expect(response.json.exclusions.map((e: any) => [e.readingId, e.reason])).toEqual([
      [first.id, 'meter fault: register stuck for nine days'],
      [`${second.start}..${second.end}`, 'estimated read, corrected on the next bill'],
    ]);
    expect(response.json.fit.exclusions).toHaveLength(2);
    expect(response.json.fit.periods.excluded).toEqual([]);
    expect(response.json.fit.periods.used).toBe(22);
    const kept = BASELINE.filter((r) => r.start !== first.start && r.start !== second.start);
    const engine = analyseBaseline(kept, WEATHER);
    expect(response.json.selected).toBe(engine.choice.selected);
    expect(response.json.fit.candidates[0].sse).toBeCloseTo(engine.document.candidates[0]!.sse!, 6);

    const id = response.json.id;
    const frozen = await api.call('POST', `/v1/baselines/${id}/freeze`, {
      as: 'engineer',
      body: { note: 'M&V plan, option C (invented)' },
    });
    expect(frozen.status).toBe(200);
    const read = await api.call('GET', `/v1/baselines/${id}`, { as: 'analyst' });
    expect(read.json.verified).toBe(true);
    expect(read.json.exclusions).toHaveLength(2);
  });

  it('refuses a reading that does not exist, a missing reason, a reading twice, and more than a fifth; nothing stored', async () => {
    const meterId = await seedMeter();
    const listed = await api.call('GET', `/v1/meters/${meterId}/readings`, { as: 'analyst' });
    const ids: string[] = listed.json.readings.map((r: any) => r.id);
    const cases: [unknown, number, string][] = [
      [[{ readingId: '2023-01-05..2023-02-05', reason: 'fault' }], 422, 'exclusions[0]'],
      [[{ readingId: ids[0], reason: '' }], 400, 'reason'],
      [
        [
          { readingId: ids[0], reason: 'fault' },
          { readingId: ids[0], reason: 'again' },
        ],
        422,
        'exclusions[1]',
      ],
      [ids.slice(0, 5).map((readingId) => ({ readingId, reason: 'doubtful' })), 422, 'more than a fifth'],
      [[{ reason: 'which one?' }], 400, 'readingId'],
    ];
    for (const [exclusions, status, field] of cases) {
      const before = await databaseDigest(api.store.db);
      const response = await api.call('POST', `/v1/meters/${meterId}/baselines`, {
        as: 'engineer',
        body: { ...WINDOW, exclusions },
      });
      expect(response.status, JSON.stringify(exclusions)).toBe(status);
      expect(response.json.detail).toContain(field);
      expect(await databaseDigest(api.store.db)).toBe(before);
    }
    // Four of 24 is a fifth or less: allowed.
    const four = await api.call('POST', `/v1/meters/${meterId}/baselines`, {
      as: 'engineer',
      body: { ...WINDOW, exclusions: ids.slice(0, 4).map((readingId) => ({ readingId, reason: 'doubtful' })) },
    });
    expect(four.status).toBe(201);
  });
});
