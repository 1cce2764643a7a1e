/**
 * Savings over HTTP against the frozen baseline. Check values: the engine
 * itself (savingsFromFit on the same data and model, as the command line's
 * savings --json gives it), the API contract (status codes, field names,
 * permissions, the offered confidence levels), and synthetic inputs whose
 * truth the test sets.
 */
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import {
  alignPeriods,
  analyseBaseline,
  analyseSavings,
  baselineSufficiency,
  NO_OVERRIDES,
  reportingExtrapolation,
  savingsFromFit,
  withProjectionChecks,
  type DailyTemperature,
  type ModelName,
  type Reading,
} from '../../src/engine/index.js';
import { toJsonDocument } from '../../src/cli/format/json.js';
import { bumpMeterVersions } from '../../src/store/data-versions.js';
import { makeTestApi, type TestApi } from '../support/api.js';
import { databaseDigest } from '../support/db-digest.js';
import { CLIMATES, SAMPLE_BUILDING, dailyWeather, monthlyReadings, seededRandom } from '../support/synthetic.js';

// synthetic: the test sets the truth. An invented building in an invented
// temperate climate: 24 monthly baseline bills, then 12 bills after measures
// that lower its base load and heating rate.
const random = seededRandom(23);
const WEATHER = dailyWeather(CLIMATES.temperate, '2023-01-01', 1096, random);
const BASELINE = monthlyReadings(SAMPLE_BUILDING, WEATHER, '2023-01-01', 24, random);
const REPORTING = monthlyReadings(
  { ...SAMPLE_BUILDING, base: 255, heatingRate: 6.5 },
  WEATHER,
  '2025-01-01',
  12,
  random,
);
const WINDOW = { start: '2023-01-01', end: '2025-01-01' };
const EXTRA_KEYS = ['meterId', 'adjustments', 'baselineId', 'baselineVersion', 'baselineContentHash', 'weatherFills'];

const ENGINE = analyseBaseline(BASELINE, WEATHER);

/** The CLI's savings --json document of the same data and model: the engine itself. */
function engineSavings(
  model: ModelName,
  reporting: readonly Reading[],
  confidence?: number,
  baseline = ENGINE,
  weather: readonly DailyTemperature[] = WEATHER,
): unknown {
  const fit = baseline.choice.candidates.find((c) => c.model === model)!.fit!;
  const document = savingsFromFit(
    fit,
    { limits: baseline.choice.settings.guideline14, excluded: baseline.excluded },
    reporting,
    weather,
    {
      confidence,
    },
  );
  // The checks between baseline and projection, as the engine states them (the CLI's savings --json carries the same).
  const checks = {
    sufficiency: baselineSufficiency(baseline.periods),
    extrapolation: reportingExtrapolation(fit, alignPeriods(reporting, weather).periods),
    overrides: NO_OVERRIDES,
  };
  return JSON.parse(toJsonDocument(withProjectionChecks(document, checks)));
}

function withoutBaselineKeys(body: Record<string, unknown>): Record<string, unknown> {
  return Object.fromEntries(Object.entries(body).filter(([key]) => !EXTRA_KEYS.includes(key)));
}

let api: TestApi;

/** A station with daily weather, a facility, and a meter with readings, all through the API. */
async function seedMeter(
  readings: readonly Reading[] = [...BASELINE, ...REPORTING],
  weather: readonly DailyTemperature[] = WEATHER,
): Promise<string> {
  const station = await api.call('POST', '/v1/weather-stations', {
    as: 'engineer',
    body: { name: 'Invented ridge station', temperatureUnit: 'F' },
  });
  const observations = weather.map((d) => ({ date: d.date, temp: d.temp }));
  expect(
    (
      await api.call('PUT', `/v1/weather-stations/${station.json.id}/observations`, {
        as: 'integration',
        body: { observations },
      })
    ).status,
  ).toBe(200);
  const facility = await api.call('POST', '/v1/facilities', {
    as: 'engineer',
    body: { name: 'Test depot 3 (invented)' },
  });
  const meter = await api.call('POST', `/v1/facilities/${facility.json.id}/meters`, {
    as: 'engineer',
    body: {
      name: 'Depot main electric (invented)',
      fuel: 'electricity',
      unit: 'kWh',
      weatherStationId: station.json.id,
    },
  });
  expect(meter.status).toBe(201);
  const rows = readings.map((r) => ({ start: r.start, end: r.end, quantity: r.quantity }));
  expect(
    (await api.call('POST', `/v1/meters/${meter.json.id}/readings`, { as: 'integration', body: { readings: rows } }))
      .status,
  ).toBe(201);
  return meter.json.id;
}

/** Fit, optionally choose, and freeze a baseline through the API. */
async function frozenBaseline(meterId: string, choose?: ModelName, window = WINDOW): Promise<any> {
  const draft = await api.call('POST', `/v1/meters/${meterId}/baselines`, { as: 'engineer', body: window });
  expect(draft.status).toBe(201);
  if (choose) {
    const chosen = await api.call('POST', `/v1/baselines/${draft.json.id}/choose`, {
      as: 'engineer',
      body: { model: choose, reason: 'Engineer’s review (test)' },
    });
    expect(chosen.status).toBe(200);
  }
  const frozen = await api.call('POST', `/v1/baselines/${draft.json.id}/freeze`, {
    as: 'engineer',
    body: { note: 'Agreed (test)' },
  });
  expect(frozen.status).toBe(200);
  return frozen.json;
}

const savings = (
  meterId: string,
  query = '',
  as: 'admin' | 'engineer' | 'analyst' | 'integration' | 'other' | 'none' = 'analyst',
) => api.call('GET', `/v1/meters/${meterId}/savings${query}`, { as });

beforeAll(async () => {
  api = await makeTestApi();
});
afterAll(async () => {
  await api.close();
});

describe('GET /v1/meters/{id}/savings', () => {
  let meterId: string;
  let baseline: any;

  beforeAll(async () => {
    meterId = await seedMeter();
    baseline = await frozenBaseline(meterId);
  });

  it('states avoided energy from the frozen fit exactly as the engine does', async () => {
    const response = await savings(meterId);
    expect(response.status).toBe(200);
    expect(response.json).toMatchObject({
      meterId,
      baselineId: baseline.id,
      baselineVersion: 1,
      baselineContentHash: baseline.contentHash,
    });
    const expected = engineSavings(ENGINE.choice.selected, REPORTING) as Record<string, unknown>; // the engine itself
    expect(withoutBaselineKeys(response.json)).toEqual(expected);
    expect(Object.keys(response.json).sort()).toEqual([...Object.keys(expected), ...EXTRA_KEYS].sort()); // exactly the CLI's keys, plus the baseline's
    // The engine itself, refitting path: same numbers (with the same checks stated).
    const refit = analyseSavings(ENGINE, REPORTING, WEATHER);
    const refitChecks = {
      sufficiency: baselineSufficiency(ENGINE.periods),
      extrapolation: reportingExtrapolation(
        ENGINE.choice.candidates.find((c) => c.model === refit.model)!.fit!,
        alignPeriods(REPORTING, WEATHER).periods,
      ),
      overrides: NO_OVERRIDES,
    };
    expect(JSON.parse(toJsonDocument(withProjectionChecks(refit, refitChecks)))).toEqual(expected);
    expect(response.json.periods).toHaveLength(12); // synthetic: 12 reporting bills
    expect(response.json.totals.confidence).toBe(0.68); // the default (ASHRAE Guideline 14's 68% rule, from memory)
    expect(response.json.totals.savings).toBeGreaterThan(0); // synthetic: the measures lowered use
  });

  it('states the uncertainty at every offered confidence', async () => {
    for (const confidence of [0.8, 0.9, 0.95]) {
      const response = await savings(meterId, `?confidence=${confidence}`);
      expect(response.status).toBe(200);
      expect(withoutBaselineKeys(response.json)).toEqual(engineSavings(ENGINE.choice.selected, REPORTING, confidence)); // the engine itself
    }
  });

  it('limits the reporting period to from..to, and never reaches into the baseline', async () => {
    const inside = REPORTING.filter((r) => r.start >= '2025-04-01' && r.end <= '2025-10-01');
    expect(inside).toHaveLength(6); // synthetic: April to September
    const response = await savings(meterId, '?from=2025-04-01&to=2025-10-01&confidence=0.9');
    expect(withoutBaselineKeys(response.json)).toEqual(engineSavings(ENGINE.choice.selected, inside, 0.9)); // the engine itself

    const early = await savings(meterId, '?from=2024-06-01');
    expect(withoutBaselineKeys(early.json)).toEqual(engineSavings(ENGINE.choice.selected, REPORTING)); // the engine itself: baseline bills stay out
  });

  it('projects the stored fit: editing baseline readings afterwards changes nothing', async () => {
    await api.store.db
      .updateTable('readings')
      .set({ quantity: 1 })
      .where('meter_id', '=', meterId)
      .where('period_end', '<=', WINDOW.end)
      .execute();
    // A query not asked before, so nothing computed earlier can answer it.
    const inside = REPORTING.filter((r) => r.end <= '2025-12-01');
    const after = await savings(meterId, '?to=2025-12-01&confidence=0.95');
    expect(withoutBaselineKeys(after.json)).toEqual(engineSavings(ENGINE.choice.selected, inside, 0.95)); // the engine itself, on the original baseline

    // A reporting reading that changes is seen at once. These writes go round the service, so they give the meter
    // a new data version themselves, as every service write does in its transaction (test/http/savings-cache.test.ts).
    const before = await savings(meterId);
    await api.store.db
      .updateTable('readings')
      .set({ quantity: REPORTING[0]!.quantity * 0.9 })
      .where('meter_id', '=', meterId)
      .where('period_start', '=', REPORTING[0]!.start)
      .execute();
    await api.store.db.transaction().execute((trx) => bumpMeterVersions(trx, [meterId]));
    const changed = await savings(meterId);
    expect(changed.json.totals.actual).toBeCloseTo(before.json.totals.actual - REPORTING[0]!.quantity * 0.1, 6); // hand-worked: 10% less in the first bill
    await api.store.db
      .updateTable('readings')
      .set({ quantity: REPORTING[0]!.quantity })
      .where('meter_id', '=', meterId)
      .where('period_start', '=', REPORTING[0]!.start)
      .execute();
    await api.store.db.transaction().execute((trx) => bumpMeterVersions(trx, [meterId]));
    expect((await savings(meterId)).json).toEqual(before.json);
  });

  it('answers 400 naming the query field, storing nothing', async () => {
    const digest = await databaseDigest(api.store.db);
    for (const [query, field] of [
      ['?confidence=0.5', 'query.confidence'],
      ['?confidence=abc', 'query.confidence'],
      ['?confidence=', 'query.confidence'],
      ['?from=2025-13-01', 'query.from'],
      ['?from=2025-06-01&to=2025-06-01', 'query.to'],
      ['?to=2025-06-01&from=2025-07-01', 'query.to'],
      ['?confidance=0.9', 'confidance'],
    ] as const) {
      const response = await savings(meterId, query);
      expect(response.status, query).toBe(400);
      expect(response.json.detail, query).toContain(field);
    }
    expect(await databaseDigest(api.store.db)).toBe(digest);
  });

  it('is open to analysts and integrations, closed to others', async () => {
    expect((await savings(meterId, '', 'integration')).status).toBe(200);
    expect((await savings(meterId, '', 'engineer')).status).toBe(200);
    expect((await savings(meterId, '', 'none')).status).toBe(401);
    expect((await savings(meterId, '', 'other')).status).toBe(404);
    expect((await savings('mtr_unknown')).status).toBe(404);
  });
});

describe('savings against another shape, a newer baseline, or none', () => {
  it('uses the shape the engineer chose', async () => {
    const other = ENGINE.document.candidates.find(
      (c) => c.verdict === 'accepted' || (c.verdict === 'rejected' && c.model !== '1P'),
    )!.model; // the engine itself
    const meterId = await seedMeter();
    await frozenBaseline(meterId, other);
    const response = await savings(meterId);
    expect(response.json.model).toBe(other);
    expect(withoutBaselineKeys(response.json)).toEqual(engineSavings(other, REPORTING)); // the engine itself
  });

  it('follows the supersede to the newer version', async () => {
    const meterId = await seedMeter();
    const first = await frozenBaseline(meterId);
    const draft = await api.call('POST', `/v1/meters/${meterId}/baselines`, {
      body: { start: '2024-01-01', end: '2025-01-01' },
    });
    const second = await api.call('POST', `/v1/baselines/${draft.json.id}/freeze`, {
      body: { note: 'Second year only', supersedeReason: 'Tenant change in 2023' },
    });
    expect(second.json.supersedes).toBe(first.id);
    const response = await savings(meterId);
    expect(response.json.baselineVersion).toBe(2);
    const secondYear = analyseBaseline(BASELINE.slice(12), WEATHER); // the engine itself
    expect(withoutBaselineKeys(response.json)).toEqual(
      engineSavings(secondYear.choice.selected, REPORTING, undefined, secondYear),
    );
  });

  it('asks for a frozen baseline first', async () => {
    const meterId = await seedMeter();
    const none = await savings(meterId);
    expect(none.status).toBe(422);
    expect(none.json.detail).toContain('freeze a baseline first');
    await api.call('POST', `/v1/meters/${meterId}/baselines`, { body: WINDOW });
    const draftOnly = await savings(meterId);
    expect(draftOnly.status).toBe(422);
    expect(draftOnly.json.detail).toContain('freeze a baseline first');
  });

  it('says so when there is no reporting reading', async () => {
    const meterId = await seedMeter(BASELINE);
    await frozenBaseline(meterId);
    const response = await savings(meterId);
    expect(response.status).toBe(422);
    expect(response.json.detail).toContain('no reporting readings');
    expect(response.json.detail).toContain('2025-01-01');
  });

  it('says so when no reporting reading has enough weather', async () => {
    const meterId = await seedMeter(
      undefined,
      WEATHER.filter((d) => d.date < '2025-01-01'),
    );
    await frozenBaseline(meterId);
    const response = await savings(meterId);
    expect(response.status).toBe(422);
    expect(response.json.detail).toContain('weather covers 0 of 31 days'); // the engine itself: no weather after the baseline
  });

  it('refuses savings from a frozen baseline whose stored fit was edited behind the API', async () => {
    const meterId = await seedMeter();
    const frozen = await frozenBaseline(meterId);
    const row = await api.store.db
      .selectFrom('baselines')
      .select(['fits_json', 'chosen_model'])
      .where('id', '=', frozen.id)
      .executeTakeFirstOrThrow();
    const fits = JSON.parse(row.fits_json);
    fits[row.chosen_model].rawCoefficients[0] *= 1.1;
    await api.store.db
      .updateTable('baselines')
      .set({ fits_json: JSON.stringify(fits) })
      .where('id', '=', frozen.id)
      .execute();
    const response = await savings(meterId);
    expect(response.status).toBe(422);
    expect(response.json.detail).toContain('no longer matches its content hash');
  });

  it('answers non-finite figures as null, as the command line does', async () => {
    // synthetic: exactly 100 kWh every day, before and after: zero residuals and zero savings, so ΔS/S is 0/0.
    const flat = (readings: readonly Reading[]) =>
      readings.map((r) => ({ ...r, quantity: 100 * ((Date.parse(r.end) - Date.parse(r.start)) / 864e5) }));
    const meterId = await seedMeter([...flat(BASELINE.slice(0, 12)), ...flat(REPORTING.slice(0, 3))]);
    await frozenBaseline(meterId, undefined, { start: '2023-01-01', end: '2024-01-01' });
    const response = await savings(meterId);
    expect(response.status).toBe(200);
    expect(response.json.totals.savings).toBe(0); // synthetic: the test sets the truth
    expect(response.json.totals.uncertainty.guideline14.fractional).toBeNull(); // the engine itself: NaN
    const flatBaseline = analyseBaseline(flat(BASELINE.slice(0, 12)), WEATHER);
    expect(withoutBaselineKeys(response.json)).toEqual(
      engineSavings(flatBaseline.choice.selected, flat(REPORTING.slice(0, 3)), undefined, flatBaseline),
    ); // the engine itself
  });
});

describe('weather filled on record shows in savings and reports', () => {
  it('names the reporting period whose weather was filled, by method, in the savings document and the report', async () => {
    // Synthetic: three days of the reporting weather withheld, then filled by interpolation on record.
    const withheld = new Set(['2025-03-10', '2025-03-11', '2025-03-12']);
    const meterId = await seedMeter(
      undefined,
      WEATHER.filter((d) => !withheld.has(d.date)),
    );
    await frozenBaseline(meterId);
    const meter = await api.call('GET', `/v1/meters/${meterId}`, { as: 'analyst' });
    const fill = await api.call('POST', `/v1/weather-stations/${meter.json.weatherStationId}/gap-fills`, {
      as: 'engineer',
      body: { from: '2025-03-01', to: '2025-04-01', maxInterpolationDays: 3 },
    });
    expect(fill.json.filled).toEqual({ interpolation: 3, secondStation: 0 });
    const response = await savings(meterId);
    expect(response.status, response.text).toBe(200);
    expect(response.json.weatherFills).toHaveLength(1);
    expect(response.json.weatherFills[0]).toMatchObject({ interpolation: 3, secondStation: 0 });
    expect(response.json.weatherFills[0].summary).toMatch(/^3 of \d+ days filled by interpolation$/);
    // This meter's facility only: an earlier test in this file tampers with another meter's baseline on purpose.
    const window = `from=2025-01-01&to=2026-01-01&facilityId=${meter.json.facilityId}`;
    const report = await api.call('GET', `/v1/reports/savings?${window}`, { as: 'analyst' });
    expect(report.status, report.text).toBe(200);
    const meterReport = report.json.facilities
      .flatMap((f: { meters: unknown[] }) => f.meters)
      .find((m: { id: string }) => m.id === meterId);
    expect(meterReport.weatherFills[0].summary).toBe(response.json.weatherFills[0].summary);
    const html = await api.call('GET', `/v1/reports/savings?${window}&format=html`, { as: 'analyst' });
    expect(html.text).toContain(response.json.weatherFills[0].summary);
  });

  it('names the baseline period whose weather was filled in the draft, the frozen baseline and its reads, and keeps the filled days frozen', async () => {
    // Synthetic: three days of the baseline weather withheld, then filled by interpolation on record.
    const withheld = new Set(['2023-06-10', '2023-06-11', '2023-06-12']);
    const meterId = await seedMeter(
      undefined,
      WEATHER.filter((d) => !withheld.has(d.date)),
    );
    const meter = await api.call('GET', `/v1/meters/${meterId}`, { as: 'analyst' });
    const stationId = meter.json.weatherStationId;
    const fill = await api.call('POST', `/v1/weather-stations/${stationId}/gap-fills`, {
      as: 'engineer',
      body: { from: '2023-06-01', to: '2023-07-01', maxInterpolationDays: 3 },
    });
    expect(fill.json.filled).toEqual({ interpolation: 3, secondStation: 0 });
    const draft = await api.call('POST', `/v1/meters/${meterId}/baselines`, { as: 'engineer', body: WINDOW });
    expect(draft.status).toBe(201);
    expect(draft.json.weatherFills).toHaveLength(1); // synthetic: one bill holds the three days
    const [period] = draft.json.weatherFills;
    expect(period).toMatchObject({ interpolation: 3, secondStation: 0 });
    expect(period.start <= '2023-06-10' && '2023-06-12' < period.end).toBe(true);
    expect(period.summary).toBe(`3 of ${period.days} days filled by interpolation`);
    const frozen = await api.call('POST', `/v1/baselines/${draft.json.id}/freeze`, {
      as: 'engineer',
      body: { note: 'Agreed (test)' },
    });
    expect(frozen.json.weatherFills).toEqual(draft.json.weatherFills);
    const read = await api.call('GET', `/v1/baselines/${draft.json.id}`, { as: 'analyst' });
    expect(read.json.weatherFills).toEqual(draft.json.weatherFills);
    // A filled day inside the frozen window is protected as an observed one is: no observation replaces it.
    const replace = await api.call('PUT', `/v1/weather-stations/${stationId}/observations`, {
      as: 'integration',
      body: { observations: [{ date: '2023-06-11', temp: 70 }] },
    });
    expect(replace.status).toBe(409); // the API contract
    expect((await api.call('GET', `/v1/baselines/${draft.json.id}`, { as: 'analyst' })).json.weatherFills).toEqual(
      draft.json.weatherFills,
    );
  });
});
