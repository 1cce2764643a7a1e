/**
 * Baselines over HTTP: fit a draft, choose a shape, freeze, supersede,
 * verify the content hash, and draw the energy signature. Check values: the
 * engine itself (the fit document of the same readings and weather, as the
 * command line's fit --json gives it), the API contract (status codes, field
 * names, permissions, one audit row per write), hand-worked counts, and
 * synthetic inputs whose truth the test sets.
 */
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { analyseBaseline, type Reading } from '../../src/engine/index.js';
import { toJsonDocument } from '../../src/cli/format/json.js';
import { canonicalJson, sha256Hex } from '../../src/lib/canonical-json.js';
import type { Role } from '../../src/domain/principal.js';
import { makeTestApi, type CallOptions, type TestApi } from '../support/api.js';
import { databaseDigest } from '../support/db-digest.js';
import { CLIMATES, SAMPLE_BUILDING, dailyWeather, monthlyReadings, seededRandom } from '../support/synthetic.js';

// synthetic: the test sets the truth. An invented building (SAMPLE_BUILDING:
// heating below 55 °F, cooling above 68 °F) in an invented temperate climate,
// 24 monthly bills of baseline and 12 after its measures.
const random = seededRandom(11);
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

/** The CLI's fit --json document of the same data: the engine itself. */
const ENGINE = analyseBaseline(BASELINE, WEATHER);
const engineFitJson = () => JSON.parse(toJsonDocument(ENGINE.document));

let api: TestApi;

function keyIdOf(role: Role): string {
  return api.keys[role].split('_')[1]!;
}

/** A station with daily weather, a facility, and a meter with readings, all through the API. */
async function seedMeter(
  options: { name?: string; weather?: boolean; readings?: readonly Reading[] } = {},
): Promise<string> {
  const station = await api.call('POST', '/v1/weather-stations', {
    as: 'engineer',
    body: { name: 'Invented valley station', temperatureUnit: 'F' },
  });
  expect(station.status).toBe(201);
  if (options.weather ?? true) {
    const observations = WEATHER.map((d) => ({ date: d.date, temp: d.temp }));
    expect(
      (
        await api.call('PUT', `/v1/weather-stations/${station.json.id}/observations`, {
          as: 'integration',
          body: { observations },
        })
      ).status,
    ).toBe(200);
  }
  const facility = await api.call('POST', '/v1/facilities', {
    as: 'engineer',
    body: { name: 'Test building 7 (invented)' },
  });
  const meter = await api.call('POST', `/v1/facilities/${facility.json.id}/meters`, {
    as: 'engineer',
    body: {
      name: options.name ?? 'Main electric (invented)',
      fuel: 'electricity',
      unit: 'kWh',
      weatherStationId: station.json.id,
    },
  });
  expect(meter.status).toBe(201);
  const readings = (options.readings ?? [...BASELINE, ...REPORTING]).map((r) => ({
    start: r.start,
    end: r.end,
    quantity: r.quantity,
  }));
  expect(
    (await api.call('POST', `/v1/meters/${meter.json.id}/readings`, { as: 'integration', body: { readings } })).status,
  ).toBe(201);
  return meter.json.id;
}

async function fitDraft(meterId: string, body: unknown = WINDOW, as: CallOptions['as'] = 'engineer') {
  return api.call('POST', `/v1/meters/${meterId}/baselines`, { as, body });
}

async function auditActions(baselineId: string): Promise<{ action: string; before: any; after: any }[]> {
  const rows = await api.store.db
    .selectFrom('audit_log')
    .selectAll()
    .where('entity_type', '=', 'baseline')
    .where('entity_id', '=', baselineId)
    .orderBy('seq')
    .execute();
  return rows.map((r) => ({
    action: r.action,
    before: r.before_json && JSON.parse(r.before_json),
    after: r.after_json && JSON.parse(r.after_json),
  }));
}

/** Expect a 400/409/422 problem naming `field`, with nothing stored. */
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

beforeAll(async () => {
  api = await makeTestApi();
});
afterAll(async () => {
  await api.close();
});

describe('POST /v1/meters/{id}/baselines', () => {
  it('fits a draft with every candidate, exactly as the engine fits the same data', async () => {
    const meterId = await seedMeter();
    const response = await fitDraft(meterId);
    expect(response.status).toBe(201);
    const body = response.json;
    expect(body).toMatchObject({
      meterId,
      version: 1,
      status: 'draft',
      start: WINDOW.start,
      end: WINDOW.end,
      contentHash: null,
      note: null,
      frozenAt: null,
      supersedes: null,
    });
    expect(body.id).toMatch(/^bsl_/);
    expect(body.selected).toBe(ENGINE.choice.selected); // the engine itself
    expect(body.chosen).toBe(ENGINE.choice.selected); // the engine itself
    expect(body.fit).toEqual(engineFitJson()); // the engine itself (the CLI's fit --json of the same readings and weather)
    expect(body.fit.candidates.map((c: any) => c.model)).toEqual(['1P', '2P', '3PC', '3PH', '4P', '5P']);

    const row = await api.store.db
      .selectFrom('baselines')
      .selectAll()
      .where('id', '=', body.id)
      .executeTakeFirstOrThrow();
    const inputs = JSON.parse(row.inputs_json);
    expect(inputs.readings).toHaveLength(24); // synthetic: 24 baseline bills, the 12 reporting bills lie outside the window
    expect(inputs.weather).toHaveLength(731); // hand-worked: 2023-01-01..2025-01-01 is 365 + 366 days
    expect(inputs.temperatureUnit).toBe('F');
    expect(Object.keys(JSON.parse(row.fits_json)).sort()).toEqual(
      ENGINE.choice.candidates
        .filter((c) => c.fit)
        .map((c) => c.model)
        .sort(),
    ); // the engine itself
    expect((await auditActions(body.id)).map((a) => a.action)).toEqual(['create']);

    const second = await fitDraft(meterId, { ...WINDOW, options: { significanceLevel: 0.1 } });
    expect(second.json.version).toBe(2); // synthetic: versions count up per meter
    expect(second.json.options).toEqual({ significanceLevel: 0.1 });
    expect(second.json.fit.settings.significanceLevel).toBe(0.1);
  });

  it('keeps NaN in the stored fit and answers it as null', async () => {
    // synthetic: a meter using exactly 100 kWh every day has zero residuals, so
    // R², t-statistics and the autocorrelation of the 1P fit are 0/0.
    const flat = BASELINE.slice(0, 12).map((r) => ({
      ...r,
      quantity: 100 * ((Date.parse(r.end) - Date.parse(r.start)) / 864e5),
    }));
    const meterId = await seedMeter({ readings: flat });
    const response = await fitDraft(meterId, { start: '2023-01-01', end: '2024-01-01' });
    expect(response.status).toBe(201);
    const oneP = response.json.fit.candidates.find((c: any) => c.model === '1P');
    expect(oneP.stats.autocorrelation).toBeNull(); // the engine itself: NaN for zero residuals
    const row = await api.store.db
      .selectFrom('baselines')
      .select(['fits_json'])
      .where('id', '=', response.json.id)
      .executeTakeFirstOrThrow();
    expect(JSON.parse(row.fits_json)['1P'].stats.autocorrelation).toEqual({ $nonFinite: 'NaN' });
  });

  it('answers 422 naming why when too few periods are usable', async () => {
    const noWeather = await seedMeter({ weather: false });
    const problem = await expectRejected(() => fitDraft(noWeather), 422, 'at least 2 usable periods');
    expect(problem.detail).toContain('weather covers 0 of 31 days'); // the engine itself: January has no weather
    expect(problem.errors[0].field).toBe('reading 2023-01-01..2023-02-01');

    const meterId = await seedMeter();
    const empty = await expectRejected(
      () => fitDraft(meterId, { start: '2020-01-01', end: '2021-01-01' }),
      422,
      'start',
    );
    expect(empty.detail).toContain('no reading');
  });

  it('answers 422 naming the option when α is so small that 1 − α rounds to 1', async () => {
    const meterId = await seedMeter();
    // 5e-324 lies inside (0, 1), but 1 − 5e-324 === 1 in IEEE 754 double precision (common practice): no t quantile there.
    const problem = await expectRejected(
      () => fitDraft(meterId, { ...WINDOW, options: { significanceLevel: 5e-324 } }),
      422,
      'options.significanceLevel',
    );
    expect(problem.detail).toContain('1 − α rounds to 1');
  });

  it('refuses bad input with a 400 naming the field, storing nothing', async () => {
    const meterId = await seedMeter();
    await expectRejected(() => fitDraft(meterId, { start: '2024-01-01', end: '2024-01-01' }), 400, 'end');
    await expectRejected(() => fitDraft(meterId, { start: '2024-02-30', end: '2025-01-01' }), 400, 'start');
    await expectRejected(() => fitDraft(meterId, { start: '2024/01/01', end: '2025-01-01' }), 400, 'start');
    await expectRejected(
      () => fitDraft(meterId, { ...WINDOW, options: { minCoverage: 0.9, colour: 'red' } }),
      400,
      'options',
    );
    await expectRejected(
      () => fitDraft(meterId, { ...WINDOW, options: { minCoverage: 1.5 } }),
      400,
      'options.minCoverage',
    );
    await expectRejected(
      () => fitDraft(meterId, { ...WINDOW, options: { minPointsPerSegment: 2.5 } }),
      400,
      'options.minPointsPerSegment',
    );
    await expectRejected(() => fitDraft(meterId, { ...WINDOW, extra: 1 }), 400, 'extra');
  });
});

describe('choosing and freezing', () => {
  let meterId: string;
  let baselineId: string;

  beforeAll(async () => {
    meterId = await seedMeter();
    baselineId = (await fitDraft(meterId)).json.id;
  });

  it('lets the engineer choose any fitted shape, noting a rejected one, and audits before and after', async () => {
    const rejected = ENGINE.document.candidates.find((c) => c.verdict === 'rejected')!; // the engine itself
    const response = await api.call('POST', `/v1/baselines/${baselineId}/choose`, {
      as: 'engineer',
      body: { model: rejected.model, reason: 'Trial of a rejected shape' },
    });
    expect(response.status).toBe(200);
    expect(response.json.chosen).toBe(rejected.model);
    expect(response.json.selected).toBe(ENGINE.choice.selected);
    expect(response.json.choiceReason).toBe('Trial of a rejected shape');
    expect(response.json.warnings.join(' ')).toContain(`${rejected.model} was rejected by screening`);

    const back = await api.call('POST', `/v1/baselines/${baselineId}/choose`, {
      as: 'engineer',
      body: { model: ENGINE.choice.selected, reason: 'The engine’s selection after review' },
    });
    expect(back.json.warnings).toEqual([]);
    const choices = (await auditActions(baselineId)).filter((a) => a.action === 'choose');
    expect(choices).toHaveLength(2);
    expect(choices[0]!.before.chosen).toBe(ENGINE.choice.selected);
    expect(choices[0]!.after.chosen).toBe(rejected.model);
    expect(choices[1]!.after.choiceReason).toBe('The engine’s selection after review');
  });

  it('refuses a bad or unfitted model', async () => {
    await expectRejected(
      () => api.call('POST', `/v1/baselines/${baselineId}/choose`, { body: { model: '6P', reason: 'x' } }),
      400,
      'model',
    );
    await expectRejected(
      () => api.call('POST', `/v1/baselines/${baselineId}/choose`, { body: { model: '2P' } }),
      400,
      'reason',
    );
    // synthetic: 3 bills cannot carry a 5P (p = 5), so it is not fitted.
    const small = await seedMeter({ readings: BASELINE.slice(0, 3) });
    const draft = await fitDraft(small, { start: '2023-01-01', end: '2023-04-01' });
    expect(draft.status).toBe(201);
    await expectRejected(
      () => api.call('POST', `/v1/baselines/${draft.json.id}/choose`, { body: { model: '5P', reason: 'x' } }),
      422,
      'model',
    );
  });

  it('freezes under a content hash that the stored columns reproduce', async () => {
    const response = await api.call('POST', `/v1/baselines/${baselineId}/freeze`, {
      as: 'engineer',
      body: { note: 'Agreed in the M&V plan, section 4 (invented)' },
    });
    expect(response.status).toBe(200);
    expect(response.json).toMatchObject({
      status: 'frozen',
      note: 'Agreed in the M&V plan, section 4 (invented)',
      frozenBy: keyIdOf('engineer'),
      supersedes: null,
    });
    expect(response.json.contentHash).toMatch(/^[0-9a-f]{64}$/);

    // hand-worked: the documented hash payload, rebuilt here from the row.
    const row = await api.store.db
      .selectFrom('baselines')
      .selectAll()
      .where('id', '=', baselineId)
      .executeTakeFirstOrThrow();
    const payload = {
      meterId,
      start: WINDOW.start,
      end: WINDOW.end,
      options: JSON.parse(row.options_json),
      inputs: JSON.parse(row.inputs_json),
      document: JSON.parse(row.document_json),
      chosen: { model: row.chosen_model, reason: row.choice_reason, fit: JSON.parse(row.fits_json)[row.chosen_model] },
    };
    expect(response.json.contentHash).toBe(sha256Hex(canonicalJson(payload)));

    const read = await api.call('GET', `/v1/baselines/${baselineId}`, { as: 'analyst' });
    expect(read.status).toBe(200);
    expect(read.json.verified).toBe(true);
    expect(read.json.fit).toEqual(engineFitJson()); // the engine itself
    expect((await auditActions(baselineId)).map((a) => a.action)).toEqual(['create', 'choose', 'choose', 'freeze']);
    // The freeze stored the compact model reports project with, bound to the same content hash.
    const stored = await api.store.db
      .selectFrom('frozen_models')
      .selectAll()
      .where('baseline_id', '=', baselineId)
      .executeTakeFirstOrThrow();
    expect(stored.content_hash).toBe(response.json.contentHash);
    expect(JSON.parse(stored.model_json).fit).toEqual(JSON.parse(row.fits_json)[row.chosen_model]);
  });

  it('keeps a frozen baseline out of reach of every route', async () => {
    const hash = (await api.call('GET', `/v1/baselines/${baselineId}`)).json.contentHash;
    const choose = await expectRejected(
      () => api.call('POST', `/v1/baselines/${baselineId}/choose`, { body: { model: '1P', reason: 'late change' } }),
      409,
      'cannot be changed',
    );
    expect(choose.type).toBe('urn:mvledger:problem:frozen');
    await expectRejected(
      () => api.call('POST', `/v1/baselines/${baselineId}/freeze`, { body: { note: 'again' } }),
      409,
      'cannot be changed',
    );
    await expectRejected(
      () => api.call('POST', `/v1/baselines/${baselineId}/freeze`, { body: { note: 'again', supersedeReason: 'x' } }),
      409,
      'cannot be changed',
    );
    expect((await api.call('GET', `/v1/baselines/${baselineId}`)).json.contentHash).toBe(hash);
  });

  it('supersedes only with a reason, keeping the old version and its hash in the history', async () => {
    const old = (await api.call('GET', `/v1/baselines/${baselineId}`)).json;
    const draft = await fitDraft(meterId, { start: '2023-02-01', end: '2025-01-01' });
    expect(draft.json.version).toBe(2);

    const refused = await expectRejected(
      () => api.call('POST', `/v1/baselines/${draft.json.id}/freeze`, { body: { note: 'Second baseline' } }),
      409,
      'supersedeReason',
    );
    expect(refused.detail).toContain(baselineId);
    expect(refused.currentBaselineId).toBe(baselineId);

    const frozen = await api.call('POST', `/v1/baselines/${draft.json.id}/freeze`, {
      body: { note: 'Second baseline', supersedeReason: 'January 2023 bill was estimated' },
    });
    expect(frozen.status).toBe(200);
    expect(frozen.json).toMatchObject({
      status: 'frozen',
      supersedes: baselineId,
      supersedeReason: 'January 2023 bill was estimated',
    });

    const previous = (await api.call('GET', `/v1/baselines/${baselineId}`)).json;
    expect(previous.status).toBe('superseded');
    expect(previous.contentHash).toBe(old.contentHash);
    expect(previous.verified).toBe(true);
    expect(previous.fit).toEqual(old.fit);

    const history = await api.call('GET', `/v1/meters/${meterId}/baselines`, { as: 'analyst' });
    expect(history.status).toBe(200);
    expect(history.json.baselines.map((b: any) => [b.version, b.status])).toEqual([
      [2, 'frozen'],
      [1, 'superseded'],
    ]);
    const actions = await auditActions(baselineId);
    expect(actions.at(-1)).toMatchObject({
      action: 'supersede',
      before: { status: 'frozen' },
      after: { status: 'superseded', supersededBy: draft.json.id },
    });
    expect((await api.call('POST', `/v1/baselines/${baselineId}/freeze`, { body: { note: 'revive' } })).status).toBe(
      409,
    );
  });

  it('refuses a supersedeReason when there is nothing to supersede', async () => {
    const other = await seedMeter();
    const draft = await fitDraft(other);
    await expectRejected(
      () =>
        api.call('POST', `/v1/baselines/${draft.json.id}/freeze`, { body: { note: 'n', supersedeReason: 'nothing' } }),
      400,
      'supersedeReason',
    );
    await expectRejected(() => api.call('POST', `/v1/baselines/${draft.json.id}/freeze`, { body: {} }), 400, 'note');
    await expectRejected(
      () => api.call('POST', `/v1/baselines/${draft.json.id}/freeze`, { body: { note: '  ' } }),
      400,
      'note',
    );
  });

  it('replays a freeze sent again with the same Idempotency-Key', async () => {
    const other = await seedMeter();
    const draft = await fitDraft(other);
    const send = () =>
      api.call('POST', `/v1/baselines/${draft.json.id}/freeze`, {
        body: { note: 'Agreed' },
        headers: { 'idempotency-key': 'freeze-7' },
      });
    const first = await send();
    expect(first.status).toBe(200);
    const digest = await databaseDigest(api.store.db);
    const replay = await send();
    expect(replay.status).toBe(200);
    expect(replay.headers['idempotent-replayed']).toBe('true');
    expect(replay.json).toEqual(first.json);
    expect(await databaseDigest(api.store.db)).toBe(digest);
  });
});

describe('the content hash', () => {
  it('no longer verifies when a stored column is edited behind the API', async () => {
    const meterId = await seedMeter();
    const id = (await fitDraft(meterId)).json.id;
    expect((await api.call('GET', `/v1/baselines/${id}`)).json.verified).toBe(false); // a draft has no hash yet
    await api.call('POST', `/v1/baselines/${id}/freeze`, { body: { note: 'Agreed' } });
    expect((await api.call('GET', `/v1/baselines/${id}`)).json.verified).toBe(true);

    const row = await api.store.db
      .selectFrom('baselines')
      .select(['document_json'])
      .where('id', '=', id)
      .executeTakeFirstOrThrow();
    const document = JSON.parse(row.document_json);
    document.candidates[0].reasons.push('edited behind the API');
    await api.store.db
      .updateTable('baselines')
      .set({ document_json: JSON.stringify(document) })
      .where('id', '=', id)
      .execute();
    const tampered = await api.call('GET', `/v1/baselines/${id}`);
    expect(tampered.status).toBe(200);
    expect(tampered.json.verified).toBe(false);
  });
});

describe('who may do what', () => {
  let meterId: string;
  let baselineId: string;

  beforeAll(async () => {
    meterId = await seedMeter();
    baselineId = (await fitDraft(meterId)).json.id;
  });

  it('lets analysts read but not fit; integrations neither', async () => {
    await expectRejected(() => fitDraft(meterId, WINDOW, 'analyst'), 403, 'ledger');
    await expectRejected(() => fitDraft(meterId, WINDOW, 'integration'), 403, 'ledger');
    await expectRejected(
      () =>
        api.call('POST', `/v1/baselines/${baselineId}/choose`, { as: 'analyst', body: { model: '1P', reason: 'x' } }),
      403,
      'ledger',
    );
    await expectRejected(
      () => api.call('POST', `/v1/baselines/${baselineId}/freeze`, { as: 'analyst', body: { note: 'x' } }),
      403,
      'ledger',
    );
    expect((await api.call('GET', `/v1/baselines/${baselineId}`, { as: 'analyst' })).status).toBe(200);
    expect((await api.call('GET', `/v1/baselines/${baselineId}/signature.svg`, { as: 'analyst' })).status).toBe(200);
    expect((await api.call('GET', `/v1/baselines/${baselineId}`, { as: 'integration' })).status).toBe(403);
    expect((await api.call('GET', `/v1/meters/${meterId}/baselines`, { as: 'integration' })).status).toBe(403);
    expect((await api.call('GET', `/v1/baselines/${baselineId}`, { as: 'none' })).status).toBe(401);
  });

  it('answers 404 to another organisation', async () => {
    await expectRejected(() => fitDraft(meterId, WINDOW, 'other'), 404, meterId);
    await expectRejected(
      () => api.call('POST', `/v1/baselines/${baselineId}/choose`, { as: 'other', body: { model: '1P', reason: 'x' } }),
      404,
      baselineId,
    );
    await expectRejected(
      () => api.call('POST', `/v1/baselines/${baselineId}/freeze`, { as: 'other', body: { note: 'x' } }),
      404,
      baselineId,
    );
    expect((await api.call('GET', `/v1/baselines/${baselineId}`, { as: 'other' })).status).toBe(404);
    expect((await api.call('GET', `/v1/baselines/${baselineId}/signature.svg`, { as: 'other' })).status).toBe(404);
    expect((await api.call('GET', `/v1/meters/${meterId}/baselines`, { as: 'other' })).status).toBe(404);
  });
});

describe('GET /v1/baselines/{id}/signature.svg', () => {
  it('draws the baseline, and the reporting periods once frozen, with the meter name escaped', async () => {
    const meterId = await seedMeter({ name: 'Annex <B> & "C" (invented)' });
    const id = (await fitDraft(meterId)).json.id;
    const count = (text: string, needle: string) => text.split(needle).length - 1;

    const draft = await api.call('GET', `/v1/baselines/${id}/signature.svg`, { as: 'analyst' });
    expect(draft.status).toBe(200);
    expect(draft.headers['content-type']).toContain('image/svg+xml');
    expect(count(draft.text, 'class="mark-baseline"')).toBe(24); // synthetic: 24 baseline bills
    expect(count(draft.text, 'class="mark-reporting"')).toBe(0); // a draft has no reporting period yet
    expect(draft.text).toContain('<polyline class="fit-line"');
    expect(draft.text).toContain('Mean outdoor temperature (°F)');
    expect(draft.text).toContain('Use per day (kWh/day)');
    expect(draft.text).toContain(`${ENGINE.choice.selected} model`);
    expect(draft.text).toContain('Annex &lt;B&gt; &amp; &quot;C&quot; (invented)');
    expect(draft.text).not.toContain('<B>');

    await api.call('POST', `/v1/baselines/${id}/freeze`, { body: { note: 'Agreed' } });
    const frozen = await api.call('GET', `/v1/baselines/${id}/signature.svg`, { as: 'analyst' });
    expect(count(frozen.text, 'class="mark-reporting"')).toBe(12); // synthetic: 12 reporting bills
    expect(frozen.text).toContain('Reporting periods (12)');
  });
});
