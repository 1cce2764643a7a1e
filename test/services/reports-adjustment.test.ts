/**
 * A stored adjustment the engine cannot apply (brought in by hand or by an
 * import from before the rule was checked) is named as the reason a meter
 * has no figures, never blamed on missing weather; savings answer 422
 * naming it. Check values: the rule itself (exactly one of quantity and
 * perDay, src/engine/adjustments.ts); synthetic data whose truth the test sets.
 */
import { afterAll, beforeAll, expect, it } from 'vitest';
import { makeTestApi, type TestApi } from '../support/api.js';
import { CLIMATES, SAMPLE_BUILDING, dailyWeather, monthlyReadings, seededRandom } from '../support/synthetic.js';

// synthetic: 24 baseline bills and 6 reporting bills of an invented building.
const random = seededRandom(5);
const WEATHER = dailyWeather(CLIMATES.temperate, '2023-01-01', 940, random);
const BILLS = monthlyReadings(SAMPLE_BUILDING, WEATHER, '2023-01-01', 30, random);

let api: TestApi;
let meter = '';

beforeAll(async () => {
  api = await makeTestApi();
  const station = (
    await api.call('POST', '/v1/weather-stations', { body: { name: 'Invented fen station', temperatureUnit: 'F' } })
  ).json.id;
  await api.call('PUT', `/v1/weather-stations/${station}/observations`, {
    body: { observations: WEATHER.map((d) => ({ date: d.date, temp: d.temp })) },
  });
  const facility = (await api.call('POST', '/v1/facilities', { body: { name: 'Invented works' } })).json.id;
  // Two meters alike: the report needs one with figures; the other gets the broken adjustment.
  const meters: string[] = [];
  for (const name of ['Invented works main', 'Invented works annex']) {
    const body = { name, fuel: 'electricity', unit: 'kWh', weatherStationId: station };
    const id = (await api.call('POST', `/v1/facilities/${facility}/meters`, { body })).json.id;
    const readings = BILLS.map((r) => ({ start: r.start, end: r.end, quantity: r.quantity }));
    await api.call('POST', `/v1/meters/${id}/readings`, { body: { readings } });
    const draft = (
      await api.call('POST', `/v1/meters/${id}/baselines`, { body: { start: '2023-01-01', end: '2025-01-01' } })
    ).json.id;
    expect((await api.call('POST', `/v1/baselines/${draft}/freeze`, { body: { note: 'Agreed (test)' } })).status).toBe(
      200,
    );
    meters.push(id);
  }
  meter = meters[0]!;
  // Neither quantity nor perDay: the API refuses this; here it arrives behind its back.
  await api.store.db
    .insertInto('adjustments')
    .values({
      id: 'adj_broken',
      organisation_id: api.organisationId,
      meter_id: meter,
      period_start: '2025-02-01',
      period_end: '2025-03-01',
      quantity: null,
      per_day: null,
      reason: 'Arrived without an amount (test)',
      created_at: '2026-01-01T00:00:00.000Z',
      created_by: 'test',
      withdrawn_at: null,
      withdrawn_by: null,
      withdraw_reason: null,
      uncertainty: null,
    })
    .execute();
});
afterAll(async () => api.close());

it('names the adjustment, not the weather, as the reason the meter has no figures', async () => {
  const report = await api.call('GET', '/v1/reports/savings?from=2025-01-01&to=2025-07-01');
  expect(report.status, report.text).toBe(200);
  const meters: { id: string; missing: string | null }[] = report.json.facilities[0].meters;
  const missing = meters.find((m) => m.id === meter)!.missing!;
  expect(meters.find((m) => m.id !== meter)!.missing).toBeNull(); // the other meter is unaffected
  expect(missing).toContain('adjustment adj_broken: exactly one of quantity and perDay must be set');
  expect(missing).not.toContain('weather');
});

it('refuses the meter’s savings with 422 naming the adjustment', async () => {
  const savings = await api.call('GET', `/v1/meters/${meter}/savings`);
  expect(savings.status).toBe(422);
  expect(savings.json.errors).toEqual([
    { field: 'adjustment adj_broken.quantity', message: 'exactly one of quantity and perDay must be set' },
  ]);
});
