/**
 * The temperature form on record and the checks between a baseline and its
 * projection, over HTTP: the form a baseline is fitted and frozen in and
 * that its savings keep (old fits without a form read as mean-form fits),
 * the refusal to freeze a baseline shorter than a full cycle of seasons, the
 * refusal of savings beyond the extrapolation limit, the overrides that pass
 * either with a reason, and adjustments with their own ±.
 *
 * Check values: the engine itself (the same data through analyseBaseline,
 * savingsFromFit, reportingExtrapolation, as the command line computes
 * them), the API contract (status codes, field names, nothing stored from a
 * rejected request), common practice (a full year of bills; 330 days), a
 * limit of our own (10% of reporting days), hand-worked arithmetic, and
 * synthetic inputs whose truth the test sets.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  alignPeriods,
  analyseBaseline,
  fitTemperatureForm,
  reportingExtrapolation,
  savingsFromFit,
  twoSidedNormalQuantile,
  type BaselineAnalysis,
  type Reading,
} from '../../src/engine/index.js';
import { toJsonDocument } from '../../src/cli/format/json.js';
import { canonicalJson, sha256Hex } from '../../src/lib/canonical-json.js';
import { baselineContentHash } from '../../src/store/baseline-content.js';
import { makeTestApi, type TestApi } from '../support/api.js';
import { databaseDigest } from '../support/db-digest.js';
import { verifyAuditChain } from '../../src/store/audit.js';
import { CLIMATES, SAMPLE_BUILDING, dailyWeather, monthlyReadings, seededRandom } from '../support/synthetic.js';

// synthetic: the test sets the truth. An invented building in an invented
// temperate climate: 24 monthly baseline bills, then 12 after its measures.
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
const WINDOW = { start: '2023-01-01', end: '2025-01-01' };
/** Four summer bills: too short a baseline (synthetic). */
const SHORT_WINDOW = { start: '2023-05-01', end: '2023-09-01' };

let api: TestApi;

beforeAll(async () => {
  api = await makeTestApi();
});
afterAll(async () => {
  await api.close();
});

async function seedMeter(readings: readonly Reading[] = [...BASELINE, ...REPORTING]): Promise<string> {
  const station = await api.call('POST', '/v1/weather-stations', {
    as: 'engineer',
    body: { name: 'Invented fen station', temperatureUnit: 'F' },
  });
  const observations = WEATHER.map((d) => ({ date: d.date, temp: d.temp }));
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
    body: { name: 'Test works 9 (invented)' },
  });
  const meter = await api.call('POST', `/v1/facilities/${facility.json.id}/meters`, {
    as: 'engineer',
    body: {
      name: 'Works main electric (invented)',
      fuel: 'electricity',
      unit: 'kWh',
      weatherStationId: station.json.id,
    },
  });
  const rows = readings.map((r) => ({ start: r.start, end: r.end, quantity: r.quantity }));
  expect(
    (await api.call('POST', `/v1/meters/${meter.json.id}/readings`, { as: 'integration', body: { readings: rows } }))
      .status,
  ).toBe(201);
  return meter.json.id;
}

/** Expect a problem of `status` naming `field`, with nothing stored. */
async function expectRejected(
  send: () => Promise<{ status: number; json: any }>,
  status: number,
  field: string,
): Promise<any> {
  const before = await databaseDigest(api.store.db);
  const response = await send();
  expect(response.status).toBe(status);
  expect(response.json.detail).toContain(field);
  expect(await databaseDigest(api.store.db)).toBe(before);
  return response.json;
}

/** The engine's savings of the same data in the same form, with the document's checks as the service states them: the engine itself. */
function engineSavings(analysis: BaselineAnalysis, reporting: readonly Reading[] = REPORTING): any {
  const fit = analysis.choice.candidates.find((c) => c.model === analysis.choice.selected)!.fit!;
  return JSON.parse(
    toJsonDocument(
      savingsFromFit(
        fit,
        { limits: analysis.choice.settings.guideline14, excluded: analysis.excluded },
        reporting,
        WEATHER,
      ),
    ),
  );
}

const freeze = (id: string, body: unknown) => api.call('POST', `/v1/baselines/${id}/freeze`, { as: 'engineer', body });

describe('the temperature form on record', () => {
  it('fits monthly bills day-resolved by default, states it, and keeps it frozen', async () => {
    const meterId = await seedMeter();
    const draft = await api.call('POST', `/v1/meters/${meterId}/baselines`, { as: 'engineer', body: WINDOW });
    expect(draft.status).toBe(201);
    expect(draft.json.temperatureForm).toBe('daily'); // the engine's default wherever daily weather covers the bills
    expect(draft.json.fit.temperatureForm).toBe('daily');
    expect(draft.json.options).toEqual({});
    expect(draft.json.sufficiency).toMatchObject({ sufficient: true, reasons: [], periods: 24, billed: true }); // synthetic: 24 bills
    expect(draft.json.overrides).toEqual({ shortBaseline: null, extrapolation: null });
    const frozen = await freeze(draft.json.id, { note: 'Agreed (test)' });
    expect(frozen.status).toBe(200);
    expect(frozen.json.temperatureForm).toBe('daily');
    const row = await api.store.db
      .selectFrom('baselines')
      .select('temperature_form')
      .where('id', '=', draft.json.id)
      .executeTakeFirstOrThrow();
    expect(row.temperature_form).toBe('daily');

    const savings = await api.call('GET', `/v1/meters/${meterId}/savings`, { as: 'analyst' });
    expect(savings.status).toBe(200);
    const expected = engineSavings(analyseBaseline(BASELINE, WEATHER)); // the engine itself, day-resolved by default
    expect(savings.json.temperatureForm).toBe('daily');
    expect(savings.json.baseline.temperatureForm).toBe('daily');
    expect(savings.json.totals).toEqual(expected.totals);

    // The signature of a day-resolved model marks each bill's expected use and says why bills sit above the line.
    const svg = (await api.call('GET', `/v1/baselines/${draft.json.id}/signature.svg`, { as: 'analyst' })).text;
    expect(svg.split('class="mark-expected"').length - 1).toBe(36); // synthetic: 24 baseline and 12 reporting bills
    expect(svg).toContain('daily response');
    expect(svg).toContain('the response is convex');
  });

  it('fits, freezes and projects in the mean form when asked, and never refits', async () => {
    const meterId = await seedMeter();
    const draft = await api.call('POST', `/v1/meters/${meterId}/baselines`, {
      as: 'engineer',
      body: { ...WINDOW, options: { temperature: 'mean' } },
    });
    expect(draft.status).toBe(201);
    expect(draft.json.temperatureForm).toBe('mean');
    expect(draft.json.options).toEqual({ temperature: 'mean' });
    const engine = analyseBaseline(BASELINE, WEATHER, { temperatureForm: 'mean' }); // the engine itself, in the mean form
    expect(draft.json.fit).toEqual(JSON.parse(toJsonDocument(engine.document)));
    expect((await freeze(draft.json.id, { note: 'Agreed (test)' })).status).toBe(200);

    const savings = await api.call('GET', `/v1/meters/${meterId}/savings`, { as: 'analyst' });
    expect(savings.status).toBe(200);
    expect(savings.json.temperatureForm).toBe('mean');
    expect(savings.json.baseline.temperatureForm).toBe('mean');
    const expected = engineSavings(engine);
    expect(savings.json.periods).toEqual(expected.periods);
    expect(savings.json.totals).toEqual(expected.totals);
    expect(savings.json.extrapolation.basis).toBe('mean');

    const svg = (await api.call('GET', `/v1/baselines/${draft.json.id}/signature.svg`, { as: 'analyst' })).text;
    expect(svg).not.toContain('mark-expected'); // mean-form charts stay as they were
    expect(svg).toContain(`Fitted ${engine.choice.selected} model`);
  });

  it('reads a fit stored before the form existed as a mean-form fit: its hash verifies and it projects in the mean form', async () => {
    const meterId = await seedMeter();
    const draft = await api.call('POST', `/v1/meters/${meterId}/baselines`, {
      as: 'engineer',
      body: { ...WINDOW, options: { temperature: 'mean' } },
    });
    expect((await freeze(draft.json.id, { note: 'Agreed (test)' })).status).toBe(200);
    // Rewrite the row as a build without the form stored it: no form in the fit JSON, the hash over exactly those columns.
    const row = await api.store.db
      .selectFrom('baselines')
      .selectAll()
      .where('id', '=', draft.json.id)
      .executeTakeFirstOrThrow();
    const strip = (value: any): any => {
      if (Array.isArray(value)) return value.map(strip);
      if (value === null || typeof value !== 'object') return value;
      return Object.fromEntries(
        Object.entries(value)
          .filter(([key]) => key !== 'temperatureForm' && key !== 'dayTemperatureRange')
          .map(([key, entry]) => [key, strip(entry)]),
      );
    };
    const oldRow = {
      ...row,
      document_json: canonicalJson(strip(JSON.parse(row.document_json))),
      fits_json: canonicalJson(strip(JSON.parse(row.fits_json))),
      options_json: '{}',
      temperature_form: 'mean' as const,
    };
    expect(oldRow.fits_json).not.toContain('temperatureForm');
    const contentHash = baselineContentHash(oldRow);
    await api.store.db
      .updateTable('baselines')
      .set({
        document_json: oldRow.document_json,
        fits_json: oldRow.fits_json,
        options_json: oldRow.options_json,
        content_hash: contentHash,
      })
      .where('id', '=', row.id)
      .execute();

    const read = await api.call('GET', `/v1/baselines/${row.id}`, { as: 'analyst' });
    expect(read.json.verified).toBe(true);
    expect(read.json.temperatureForm).toBe('mean');
    expect(read.json.fit.temperatureForm).toBe('mean'); // shown as what it is

    const savings = await api.call('GET', `/v1/meters/${meterId}/savings`, { as: 'analyst' });
    expect(savings.status).toBe(200);
    expect(savings.json.baselineContentHash).toBe(contentHash);
    expect(savings.json.temperatureForm).toBe('mean');
    expect(savings.json.totals).toEqual(
      engineSavings(analyseBaseline(BASELINE, WEATHER, { temperatureForm: 'mean' })).totals,
    ); // the engine itself
  });

  it('refuses an unknown form with a 400 naming the option, storing nothing', async () => {
    const meterId = await seedMeter();
    const problem = await expectRejected(
      () =>
        api.call('POST', `/v1/meters/${meterId}/baselines`, {
          as: 'engineer',
          body: { ...WINDOW, options: { temperature: 'weekly' } },
        }),
      400,
      'options.temperature',
    );
    expect(problem.errors[0].field).toBe('options.temperature');
  });
});

describe('a baseline too short to project from', () => {
  let meterId: string;
  let draftId: string;
  const shortBills = BASELINE.filter((r) => r.start >= SHORT_WINDOW.start && r.end <= SHORT_WINDOW.end);
  const shortEngine = analyseBaseline(shortBills, WEATHER);
  const shortFit = shortEngine.choice.candidates.find((c) => c.model === shortEngine.choice.selected)!.fit!;

  beforeAll(async () => {
    meterId = await seedMeter();
    const draft = await api.call('POST', `/v1/meters/${meterId}/baselines`, { as: 'engineer', body: SHORT_WINDOW });
    expect(draft.status).toBe(201); // fitting a short baseline stays allowed
    draftId = draft.json.id;
  });

  it('is fitted, but the draft says it is too short to freeze', async () => {
    const draft = await api.call('GET', `/v1/baselines/${draftId}`, { as: 'analyst' });
    expect(shortBills).toHaveLength(4); // synthetic: May to August
    expect(draft.json.sufficiency).toMatchObject({ sufficient: false, periods: 4, days: 123, billed: true }); // hand-worked: 31+30+31+31
    expect(draft.json.sufficiency.reasons).toHaveLength(2);
    expect(draft.json.warnings.join(' ')).toContain('too short to freeze without overrides.shortBaseline.reason');
  });

  it('refuses to freeze it without an override (422, the reasons in words), storing nothing', async () => {
    const problem = await expectRejected(() => freeze(draftId, { note: 'Agreed (test)' }), 422, 'too short to freeze');
    expect(problem.detail).toContain('cover 123 days; a full cycle of seasons needs at least 330');
    expect(problem.detail).toContain('4 usable bills; at least 12 are needed');
    expect(problem.errors[0].field).toBe('overrides.shortBaseline.reason');
  });

  it('refuses an override without a reason with a 400 naming the field, storing nothing', async () => {
    for (const overrides of [{ shortBaseline: {} }, { shortBaseline: { reason: '   ' } }, { extrapolation: {} }]) {
      const problem = await expectRejected(() => freeze(draftId, { note: 'Agreed (test)', overrides }), 400, 'reason');
      expect(problem.errors[0].field).toMatch(/^overrides\.(shortBaseline|extrapolation)\.reason$/);
    }
  });

  it('freezes it with an override and its reason, kept under the hash, audited and shown on its savings', async () => {
    const reason = 'Only four months of bills survive the tenant change; agreed in the M&V plan (invented)';
    const frozen = await freeze(draftId, { note: 'Agreed (test)', overrides: { shortBaseline: { reason } } });
    expect(frozen.status).toBe(200);
    expect(frozen.json.overrides).toEqual({ shortBaseline: { reason }, extrapolation: null });
    expect(frozen.json.warnings.join(' ')).toContain('frozen with a short-baseline override');

    // hand-worked: the documented hash payload, with overrides because the baseline carries one.
    const row = await api.store.db
      .selectFrom('baselines')
      .selectAll()
      .where('id', '=', draftId)
      .executeTakeFirstOrThrow();
    const payload = {
      meterId,
      start: SHORT_WINDOW.start,
      end: SHORT_WINDOW.end,
      options: JSON.parse(row.options_json),
      inputs: JSON.parse(row.inputs_json),
      document: JSON.parse(row.document_json),
      chosen: { model: row.chosen_model, reason: row.choice_reason, fit: JSON.parse(row.fits_json)[row.chosen_model] },
      overrides: { shortBaseline: reason, extrapolation: null },
    };
    expect(row.content_hash).toBe(sha256Hex(canonicalJson(payload)));
    expect((await api.call('GET', `/v1/baselines/${draftId}`)).json.verified).toBe(true);
    // Editing the override behind the API breaks the hash.
    await api.store.db
      .updateTable('baselines')
      .set({ short_baseline_override: 'something else' })
      .where('id', '=', draftId)
      .execute();
    expect((await api.call('GET', `/v1/baselines/${draftId}`)).json.verified).toBe(false);
    await api.store.db
      .updateTable('baselines')
      .set({ short_baseline_override: reason })
      .where('id', '=', draftId)
      .execute();

    const audit = await api.store.db
      .selectFrom('audit_log')
      .selectAll()
      .where('entity_id', '=', draftId)
      .where('action', '=', 'freeze')
      .executeTakeFirstOrThrow();
    expect(JSON.parse(audit.after_json!).overrides).toEqual({ shortBaseline: { reason }, extrapolation: null });
    expect((await verifyAuditChain(api.store.db, api.organisationId)).ok).toBe(true);
  });

  it('refuses savings beyond the extrapolation limit (422 naming the share and the limit), then projects under an override', async () => {
    // The engine itself: the spring-and-summer model against the reporting days after it.
    const reporting = [...BASELINE, ...REPORTING].filter((r) => r.start >= SHORT_WINDOW.end);
    const expected = reportingExtrapolation(shortFit, alignPeriods(reporting, WEATHER).periods);
    expect(expected.exceedsLimit).toBe(true); // synthetic: the winters lie far below a summer baseline
    const problem = await expectRejected(
      () => api.call('GET', `/v1/meters/${meterId}/savings`, { as: 'analyst' }),
      422,
      'the limit is 10.0%',
    );
    expect(problem.detail).toContain(expected.summary);
    expect(problem.extrapolation).toMatchObject({ share: expected.share, limit: 0.1, basis: 'daily' });

    // The same window again as version 2, frozen with both overrides.
    const draft = await api.call('POST', `/v1/meters/${meterId}/baselines`, { as: 'engineer', body: SHORT_WINDOW });
    const extrapolation = 'Projecting a summer model onto winter is accepted for this pilot only (invented)';
    const frozen = await freeze(draft.json.id, {
      note: 'Agreed (test)',
      supersedeReason: 'Adds the extrapolation override (test)',
      overrides: { shortBaseline: { reason: 'Four months only (invented)' }, extrapolation: { reason: extrapolation } },
    });
    expect(frozen.status).toBe(200);
    const savings = await api.call('GET', `/v1/meters/${meterId}/savings`, { as: 'analyst' });
    expect(savings.status).toBe(200);
    expect(savings.json.baseline.overrides).toEqual({
      shortBaseline: { reason: 'Four months only (invented)' },
      extrapolation: { reason: extrapolation },
    });
    expect(savings.json.baseline.sufficiency.sufficient).toBe(false);
    expect(savings.json.extrapolation).toEqual(JSON.parse(JSON.stringify(expected)));

    // The report states the overrides in the meter's notes, in JSON, CSV and HTML.
    const query = 'from=2025-01-01&to=2026-01-01';
    const json = await api.call('GET', `/v1/reports/savings?${query}`, { as: 'analyst' });
    const meter = json.json.facilities.flatMap((f: any) => f.meters).find((m: any) => m.id === meterId);
    expect(meter.missing).toBeNull();
    expect(meter.baseline.overrides.extrapolation.reason).toBe(extrapolation);
    expect(meter.notes.join(' ')).toContain(extrapolation);
    expect(meter.notes.join(' ')).toContain('Four months only (invented)');
    const csv = (await api.call('GET', `/v1/reports/savings?${query}&format=csv`, { as: 'analyst' })).text;
    expect(csv.split('\r\n')[0]!).toContain(',note,temperature_form,');
    expect(csv).toContain(extrapolation);
    const html = (await api.call('GET', `/v1/reports/savings?${query}&format=html`, { as: 'analyst' })).text;
    expect(html).toContain(extrapolation);
    expect(html).toContain('data-temperature-form="daily"');
  });

  it('refuses a short-baseline override on a baseline that covers a full cycle of seasons (400), storing nothing', async () => {
    const other = await seedMeter();
    const draft = await api.call('POST', `/v1/meters/${other}/baselines`, { as: 'engineer', body: WINDOW });
    await expectRejected(
      () => freeze(draft.json.id, { note: 'Agreed (test)', overrides: { shortBaseline: { reason: 'not needed' } } }),
      400,
      'nothing to override',
    );
  });
});

describe('a report of a meter beyond the extrapolation limit without an override', () => {
  it('reports the meter as not available, with the share and the limit', async () => {
    const meterId = await seedMeter();
    const draft = await api.call('POST', `/v1/meters/${meterId}/baselines`, { as: 'engineer', body: SHORT_WINDOW });
    expect(
      (
        await freeze(draft.json.id, {
          note: 'Agreed (test)',
          overrides: { shortBaseline: { reason: 'Four months only (invented)' } },
        })
      ).status,
    ).toBe(200);
    const report = await api.call('GET', '/v1/reports/savings?from=2025-01-01&to=2026-01-01', { as: 'analyst' });
    expect(report.status).toBe(200);
    const meter = report.json.facilities.flatMap((f: any) => f.meters).find((m: any) => m.id === meterId);
    expect(meter.missing).toMatch(
      /^savings refused: the reporting weather lies outside what the baseline saw: .*the limit is 10\.0%/,
    );
    expect(meter.extrapolation.exceedsLimit).toBe(true);
    expect(report.json.notices.join('\n')).toContain('savings refused');
  });
});

describe('adjustments with their own ±', () => {
  let meterId: string;

  beforeAll(async () => {
    meterId = await seedMeter();
    const draft = await api.call('POST', `/v1/meters/${meterId}/baselines`, { as: 'engineer', body: WINDOW });
    expect((await freeze(draft.json.id, { note: 'Agreed (test)' })).status).toBe(200);
  });

  it('refuses a negative or non-numeric ± with a 400 naming the field, storing nothing', async () => {
    const body = { start: '2025-03-01', end: '2025-05-01', quantity: 6100, reason: 'Temporary site office (invented)' };
    for (const uncertainty of [-1, '12', null]) {
      const problem = await expectRejected(
        () => api.call('POST', `/v1/meters/${meterId}/adjustments`, { as: 'engineer', body: { ...body, uncertainty } }),
        400,
        'uncertainty',
      );
      expect(problem.errors[0].field).toBe('uncertainty');
    }
  });

  it('stores, audits and returns the ±, and states it beside the model’s in savings and the report', async () => {
    // 6,100 over [03-01, 05-01), 61 days, ± 1,220 (one standard deviation of the total); wholly inside the reporting year.
    const body = {
      start: '2025-03-01',
      end: '2025-05-01',
      quantity: 6100,
      reason: 'Temporary site office (invented)',
      uncertainty: 1220,
    };
    const created = await api.call('POST', `/v1/meters/${meterId}/adjustments`, { as: 'engineer', body });
    expect(created.status).toBe(201);
    expect(created.json.uncertainty).toBe(1220);
    const audit = await api.store.db
      .selectFrom('audit_log')
      .selectAll()
      .where('entity_id', '=', created.json.id)
      .executeTakeFirstOrThrow();
    expect(JSON.parse(audit.after_json!).uncertainty).toBe(1220);
    expect(
      (await api.call('GET', `/v1/meters/${meterId}/adjustments`, { as: 'analyst' })).json.adjustments[0].uncertainty,
    ).toBe(1220);

    const savings = await api.call('GET', `/v1/meters/${meterId}/savings?confidence=0.9`, { as: 'analyst' });
    expect(savings.status).toBe(200);
    const u = savings.json.totals.uncertainty;
    // hand-worked: the whole adjustment lies in the reporting year, so its ± is 1,220 × z(0.9) (Python's statistics.NormalDist: 1.6448536269514715).
    expect(u.adjustments.absolute).toBeCloseTo(1220 * 1.6448536269514715, 6);
    expect(twoSidedNormalQuantile(0.9)).toBeCloseTo(1.6448536269514715, 9);
    const model = Math.max(u.guideline14.absolute, u.exact.absolute);
    expect(u.combined.absolute).toBeCloseTo(Math.hypot(model, 1220 * 1.6448536269514715), 6);

    const report = await api.call(
      'GET',
      `/v1/reports/savings?from=2025-01-01&to=2026-01-01&confidence=0.9&facilityId=${(await api.call('GET', `/v1/meters/${meterId}`)).json.facilityId}`,
      { as: 'analyst' },
    );
    const meter = report.json.facilities[0].meters[0];
    expect(meter.energy.uncertainty).toBeCloseTo(u.combined.absolute, 6); // the report uses the combined ±
    expect(meter.uncertaintyParts.adjustments).toBeCloseTo(u.adjustments.absolute, 6);
    expect(meter.adjustments[0].uncertainty).toBe(1220);
  });
});

describe('fitTemperatureForm of a stored fit', () => {
  it('is the form the fit states, and mean for one that states none', () => {
    expect(fitTemperatureForm({ temperatureForm: 'daily' })).toBe('daily');
    expect(fitTemperatureForm({})).toBe('mean'); // fits stored before the form existed
  });
});
