/**
 * Independent variables over HTTP: defined per facility or meter, values
 * posted as JSON or CSV (all or nothing, corrections with a reason, frozen
 * windows protected), listed in pages; a fit naming a stored variable
 * carries it as the engine does, a gap in its baseline values is refused
 * naming the dates, and savings need the reporting values (422 naming the
 * periods) before they are computed. Synthetic: the test sets the truth (an
 * invented plant whose use per day rises 0.8 kWh per unit produced); the
 * check values are the engine's own fit of the same data and the API
 * contract.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { analyseBaseline, type Reading, type VariableSeries } from '../../src/engine/index.js';
import { makeTestApi, type TestApi } from '../support/api.js';
import { databaseDigest } from '../support/db-digest.js';
import { verifyAuditChain } from '../../src/store/audit.js';
import { CLIMATES, SAMPLE_BUILDING, dailyWeather, monthlyReadings, seededRandom } from '../support/synthetic.js';

const random = seededRandom(41);
const WEATHER = dailyWeather(CLIMATES.temperate, '2023-01-01', 1000, random);
const BILLS = monthlyReadings(SAMPLE_BUILDING, WEATHER, '2023-01-01', 30, random);
// Units produced each month (invented): 0.8 kWh per unit lands on the bill.
const UNITS = BILLS.map((_, i) => 3000 + 2500 * Math.sin(i * 1.7) + 400 * (i % 3));
const READINGS: Reading[] = BILLS.map((bill, i) => ({ ...bill, quantity: bill.quantity + 0.8 * UNITS[i]! }));
const WINDOW = { start: '2023-01-01', end: '2025-01-01' };

let api: TestApi;
beforeAll(async () => {
  api = await makeTestApi();
});
afterAll(async () => {
  await api.close();
});

async function seed(): Promise<{ facilityId: string; meterId: string }> {
  const station = await api.call('POST', '/v1/weather-stations', {
    as: 'engineer',
    body: { name: 'Invented plain station', temperatureUnit: 'F' },
  });
  await api.call('PUT', `/v1/weather-stations/${station.json.id}/observations`, {
    as: 'integration',
    body: { observations: WEATHER.map((d) => ({ date: d.date, temp: d.temp })) },
  });
  const facility = await api.call('POST', '/v1/facilities', {
    as: 'engineer',
    body: { name: 'Pressing works (invented)' },
  });
  const meter = await api.call('POST', `/v1/facilities/${facility.json.id}/meters`, {
    as: 'engineer',
    body: { name: 'Works electricity (invented)', fuel: 'electricity', unit: 'kWh', weatherStationId: station.json.id },
  });
  const readings = READINGS.map((r) => ({ start: r.start, end: r.end, quantity: r.quantity }));
  expect(
    (await api.call('POST', `/v1/meters/${meter.json.id}/readings`, { as: 'integration', body: { readings } })).status,
  ).toBe(201);
  return { facilityId: facility.json.id, meterId: meter.json.id };
}

function csvOf(from: number, to: number): string {
  return ['start,end,value', ...READINGS.slice(from, to).map((r, i) => `${r.start},${r.end},${UNITS[from + i]}`)].join(
    '\n',
  );
}

describe('independent variables (POST/GET /v1/facilities/{id}/variables, /v1/variables/{id}/values)', () => {
  it('defines, posts, lists; a fit carries the variable as the engine does; savings need the reporting values', async () => {
    const { facilityId, meterId } = await seed();
    const created = await api.call('POST', `/v1/facilities/${facilityId}/variables`, {
      as: 'engineer',
      body: { name: 'units', unit: 'units', kind: 'per-period', aggregation: 'total' },
    });
    expect(created.status).toBe(201);
    expect(created.json).toMatchObject({
      facilityId,
      meterId: null,
      name: 'units',
      kind: 'per-period',
      aggregation: 'total',
    });
    const variableId = created.json.id;

    const twice = await api.call('POST', `/v1/facilities/${facilityId}/variables`, {
      as: 'engineer',
      body: { name: 'units', unit: 'units', kind: 'daily', aggregation: 'mean' },
    });
    expect(twice.status).toBe(409);
    expect(twice.json.detail).toMatch(/^name: .*already has a variable named "units"/);

    // The baseline's 24 months and 3 reporting months, as CSV; the last 3 reporting months are left for later.
    const posted = await api.call('POST', `/v1/variables/${variableId}/values`, {
      as: 'integration',
      csv: csvOf(0, 27),
    });
    expect(posted.status).toBe(201);
    expect(posted.json).toMatchObject({ received: 27, created: 27, corrected: 0, unchanged: 0 });
    const again = await api.call('POST', `/v1/variables/${variableId}/values`, { as: 'integration', csv: csvOf(0, 2) });
    expect(again.status).toBe(200);
    expect(again.json.unchanged).toBe(2);

    const page = await api.call('GET', `/v1/variables/${variableId}/values?limit=10`, { as: 'analyst' });
    expect(page.status).toBe(200);
    expect(page.json.values).toHaveLength(10);
    expect(page.json.values[0]).toEqual({ start: READINGS[0]!.start, end: READINGS[0]!.end, value: UNITS[0] });
    expect(page.json.nextCursor).toEqual(expect.any(String));
    const listed = await api.call('GET', `/v1/facilities/${facilityId}/variables`, { as: 'analyst' });
    expect(listed.json.variables.map((v: { id: string }) => v.id)).toEqual([variableId]);
    expect(listed.json.nextCursor).toBeNull();

    const fit = await api.call('POST', `/v1/meters/${meterId}/baselines`, {
      as: 'engineer',
      body: { ...WINDOW, options: { variables: ['units'], temperature: 'mean' } },
    });
    expect(fit.status).toBe(201);
    expect(fit.json.fit.variables).toEqual(['units']);
    expect(fit.json.fit.variableDecisions[0]).toMatchObject({ name: 'units', verdict: 'kept' });
    const series: VariableSeries = {
      name: 'units',
      aggregation: 'total',
      values: READINGS.slice(0, 24).map((r, i) => ({ start: r.start, end: r.end, value: UNITS[i]! })),
    };
    const engine = analyseBaseline(READINGS.slice(0, 24), WEATHER, {
      variableSeries: [series],
      variables: ['units'],
      temperatureForm: 'mean',
    });
    expect(fit.json.selected).toBe(engine.choice.selected);
    const selected = fit.json.fit.candidates.find((c: { model: string }) => c.model === fit.json.selected);
    const engineSelected = engine.document.candidates.find((c) => c.model === engine.choice.selected)!;
    expect(selected.sse).toBeCloseTo(engineSelected.sse!, 6); // the engine's own fit of the same data
    const units = selected.coefficients.find((c: { name: string }) => c.name === 'units');
    expect(Math.abs(units.estimate - 0.8)).toBeLessThan(3 * units.standardError); // the truth the test set, within 3 standard errors

    const frozen = await api.call('POST', `/v1/baselines/${fit.json.id}/freeze`, {
      as: 'engineer',
      body: { note: 'M&V plan, invented' },
    });
    expect(frozen.status).toBe(200);

    // Inside the frozen window: refused, nothing stored.
    const before = await databaseDigest(api.store.db);
    const inside = await api.call('POST', `/v1/variables/${variableId}/values`, {
      as: 'integration',
      body: { values: [{ start: READINGS[3]!.start, end: READINGS[3]!.end, value: 1 }], correctionReason: 'recount' },
    });
    expect(inside.status).toBe(409);
    expect(inside.json.detail).toMatch(/inside the window 2023-01-01\.\.2025-01-01 of frozen baseline/);
    expect(await databaseDigest(api.store.db)).toBe(before);

    // Reporting months 28 to 30 have no values yet: refused naming them.
    const missing = await api.call('GET', `/v1/meters/${meterId}/savings`, { as: 'analyst' });
    expect(missing.status).toBe(422);
    expect(missing.json.detail).toContain(`${READINGS[27]!.start} to ${READINGS[27]!.end} (units)`);
    expect(missing.json.detail).toContain(`${READINGS[29]!.start} to ${READINGS[29]!.end} (units)`);
    expect(missing.json.errors).toHaveLength(3);

    expect(
      (await api.call('POST', `/v1/variables/${variableId}/values`, { as: 'integration', csv: csvOf(27, 30) })).status,
    ).toBe(201);
    const savings = await api.call('GET', `/v1/meters/${meterId}/savings`, { as: 'analyst' });
    expect(savings.status).toBe(200);
    expect(savings.json.periods).toHaveLength(6);
    expect(savings.json.totals.outsideVariableRangeShares).toEqual({ units: expect.any(Number) });
    // No retrofit: the saving is noise, inside a few of its standard errors (the truth the test set).
    expect(Math.abs(savings.json.totals.savings)).toBeLessThan(3 * savings.json.totals.uncertainty.exact.absolute);
    expect((await verifyAuditChain(api.store.db, api.organisationId)).ok).toBe(true);
  });

  it('refuses bad values naming the row, values in another unit, a gap in the baseline values naming the dates, and an unknown name; nothing stored', async () => {
    const { facilityId, meterId } = await seed();
    const daily = await api.call('POST', `/v1/facilities/${facilityId}/variables`, {
      as: 'engineer',
      body: { name: 'occupied', unit: 'share', kind: 'daily', aggregation: 'mean', meterId },
    });
    expect(daily.status).toBe(201);
    const before = await databaseDigest(api.store.db);
    const bad = await api.call('POST', `/v1/variables/${daily.json.id}/values`, {
      as: 'integration',
      csv: 'date,value\n2023-01-01,1\n2023-01-02,1\n2023-01-02,0\n',
    });
    expect(bad.status).toBe(400);
    expect(bad.json.detail).toMatch(/^row 4, field date: 2023-01-02\.\.2023-01-03 overlaps/);
    const period = await api.call('POST', `/v1/variables/${daily.json.id}/values`, {
      as: 'integration',
      body: { values: [{ start: '2023-01-01', end: '2023-01-03', value: 1 }] },
    });
    expect(period.status).toBe(400);
    expect(period.json.detail).toMatch(/^values\[0\]\.date: a daily variable's value names its date/);
    // Values that say they are in another unit than the variable's are refused, not converted (JSON and CSV).
    const hours = await api.call('POST', `/v1/variables/${daily.json.id}/values`, {
      as: 'integration',
      body: { unit: 'hours', values: [{ date: '2023-01-01', value: 9 }] },
    });
    expect(hours.status).toBe(422);
    expect(hours.json.errors).toEqual([
      { field: 'unit', message: expect.stringContaining('are in "hours" but variable') },
    ]);
    const hoursCsv = await api.call('POST', `/v1/variables/${daily.json.id}/values?unit=hours`, {
      as: 'integration',
      csv: 'date,value\n2023-01-01,9\n',
    });
    expect(hoursCsv.status).toBe(422);
    expect(hoursCsv.json.detail).toMatch(/^unit: the values are in "hours" but variable .* is in "share"/);
    expect(await databaseDigest(api.store.db)).toBe(before);
    const sameUnit = await api.call('POST', `/v1/variables/${daily.json.id}/values?unit=Share`, {
      as: 'integration',
      csv: 'date,value\n2022-12-31,1\n',
    });
    expect(sameUnit.status).toBe(201); // the unit compared ignoring case

    // Every day of the baseline but one.
    const values = [];
    for (
      let d = new Date('2023-01-01T00:00:00Z');
      d < new Date('2025-01-01T00:00:00Z');
      d.setUTCDate(d.getUTCDate() + 1)
    ) {
      const date = d.toISOString().slice(0, 10);
      if (date !== '2023-06-14') values.push({ date, value: d.getUTCDay() % 6 === 0 ? 0 : 1 });
    }
    expect(
      (await api.call('POST', `/v1/variables/${daily.json.id}/values`, { as: 'integration', body: { values } })).status,
    ).toBe(201);
    const afterValues = await databaseDigest(api.store.db);
    const gap = await api.call('POST', `/v1/meters/${meterId}/baselines`, {
      as: 'engineer',
      body: { ...WINDOW, options: { variables: ['occupied'] } },
    });
    expect(gap.status).toBe(422);
    expect(gap.json.detail).toContain('2023-06-01 to 2023-07-01 (occupied)');
    expect(gap.json.errors).toEqual([{ field: 'reading 2023-06-01..2023-07-01', message: 'no value of occupied' }]);
    const unknown = await api.call('POST', `/v1/meters/${meterId}/baselines`, {
      as: 'engineer',
      body: { ...WINDOW, options: { variables: ['people'] } },
    });
    expect(unknown.status).toBe(422);
    expect(unknown.json.detail).toMatch(/^options\.variables\[0\]: no variable named "people"/);
    expect(await databaseDigest(api.store.db)).toBe(afterValues);
  });
});
