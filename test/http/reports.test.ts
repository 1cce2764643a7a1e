/**
 * The savings report over HTTP, with adjustments, rates, a contract and a
 * normal year set up through the API. Check values: the engine itself
 * (savingsFromFit on the same data and model, with the same adjustments),
 * hand-worked arithmetic (adjustment days, costs, guarantees, quadrature),
 * the unit factors of the brief (1 kWh = 3,412.14 Btu, 1 GJ = 947,817 Btu,
 * standard values), and synthetic inputs whose truth the test sets.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { analyseBaseline, NORMAL_YEAR_DAYS, savingsFromFit, type Reading } from '../../src/engine/index.js';
import { canonicalJson, sha256Hex } from '../../src/lib/canonical-json.js';
import { makeTestApi, type TestApi } from '../support/api.js';
import { databaseDigest } from '../support/db-digest.js';
import { CLIMATES, SAMPLE_BUILDING, dailyWeather, monthlyReadings, seededRandom } from '../support/synthetic.js';

// synthetic: the test sets the truth. An invented building in an invented
// temperate climate: 24 monthly baseline bills, then 24 reporting bills
// after measures that lower its base load and heating rate.
const random = seededRandom(41);
const WEATHER = dailyWeather(CLIMATES.temperate, '2023-01-01', 1461, random);
const BASELINE = monthlyReadings(SAMPLE_BUILDING, WEATHER, '2023-01-01', 24, random);
const REPORTING = monthlyReadings(
  { ...SAMPLE_BUILDING, base: 255, heatingRate: 6.5 },
  WEATHER,
  '2025-01-01',
  24,
  random,
);
const GAS_REPORTING = monthlyReadings({ ...SAMPLE_BUILDING, base: 270 }, WEATHER, '2025-01-01', 24, random);
const ENGINE = analyseBaseline(BASELINE, WEATHER);
const FIT = ENGINE.choice.candidates.find((c) => c.model === ENGINE.choice.selected)!.fit!;

/** hand-worked: 2025-06-01..2025-09-01 is 30 + 31 + 31 = 92 days at 50 kWh a day = 4,600 kWh. */
const ADJUSTMENT = {
  start: '2025-06-01',
  end: '2025-09-01',
  perDay: 50,
  reason: 'New server room <added> in the east wing (test)',
};
const KWH_TO_MMBTU = 3412.14 / 1e6; // the brief's standard value, 1 kWh = 3,412.14 Btu
const KWH_TO_GJ = 3412.14 / 947_817; // the brief's standard values, 1 GJ = 947,817 Btu

let api: TestApi;
let stationId: string;
let plantId: string;
let annexId: string;
let electricId: string;
let gasId: string;
let waterId: string;

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

async function meter(facilityId: string, name: string, unit: string, reporting: readonly Reading[]): Promise<string> {
  const created = await ok('POST', `/v1/facilities/${facilityId}/meters`, {
    name,
    fuel: unit === 'kWh' ? 'electricity' : 'natural-gas',
    unit,
    weatherStationId: stationId,
  });
  const rows = [...BASELINE, ...reporting].map((r) => ({ start: r.start, end: r.end, quantity: r.quantity }));
  await ok('POST', `/v1/meters/${created.id}/readings`, { readings: rows });
  const draft = await ok('POST', `/v1/meters/${created.id}/baselines`, { start: '2023-01-01', end: '2025-01-01' });
  await ok('POST', `/v1/baselines/${draft.id}/freeze`, { note: 'Agreed (test)' }, 200);
  return created.id;
}

const report = (query: string, as: 'analyst' | 'integration' | 'engineer' | 'other' = 'analyst') =>
  api.call('GET', `/v1/reports/savings?${query}`, { as });

/** A smooth invented normal year: the climate's seasonal curve without day-to-day weather. */
function normalYear(): { day: string; temp: number }[] {
  const c = CLIMATES.temperate;
  return NORMAL_YEAR_DAYS.map((day, i) => ({
    day,
    temp: Math.round((c.mean - c.amplitude * Math.cos((2 * Math.PI * (i - c.coldestDay)) / 365)) * 10) / 10,
  }));
}

beforeAll(async () => {
  api = await makeTestApi();
  stationId = (await ok('POST', '/v1/weather-stations', { name: 'Invented hill station', temperatureUnit: 'F' })).id;
  await ok('PUT', `/v1/weather-stations/${stationId}/observations`, { observations: WEATHER });
  plantId = (await ok('POST', '/v1/facilities', { name: 'Invented pumping plant' })).id;
  annexId = (await ok('POST', '/v1/facilities', { name: 'Invented annex' })).id;
  electricId = await meter(plantId, 'Plant electric', 'kWh', REPORTING);
  gasId = await meter(annexId, 'Annex gas', 'therm', GAS_REPORTING);
  waterId = await meter(annexId, 'Annex gas by volume', 'm3', GAS_REPORTING);
  await ok('PUT', `/v1/meters/${electricId}/rates`, { currency: 'USD', rates: [{ from: '2025-01-01', price: 0.1 }] });
  // No rate before 2025-04-01 for the gas meter: its first quarter has no cost.
  await ok('PUT', `/v1/meters/${gasId}/rates`, {
    currency: 'USD',
    rates: [
      { from: '2025-04-01', to: '2026-01-01', price: 1.2 },
      { from: '2026-01-01', price: 1.3 },
    ],
  });
  await ok('PUT', `/v1/facilities/${plantId}/contract`, {
    start: '2025-01-01',
    years: 3,
    currency: 'USD',
    energyUnit: 'MMBtu',
    guarantees: [
      { year: 1, energy: 100, cost: 2500 },
      { year: 2, energy: 120, cost: 3000 },
    ],
  });
  await ok('POST', `/v1/meters/${electricId}/adjustments`, ADJUSTMENT);
  await ok('PUT', `/v1/weather-stations/${stationId}/normal-year`, {
    source: 'Invented 30-year mean (test)',
    days: normalYear(),
  });
});
afterAll(async () => {
  await api.close();
});

describe('GET /v1/reports/savings', () => {
  it('gives each meter the engine’s savings with its adjustments, costs at the contract rate, and the roll-up', async () => {
    const reply = await report(`contractYear=1&facilityId=${plantId}&confidence=0.9`);
    expect(reply.status, reply.text).toBe(200);
    const body = reply.json;
    expect(body.window).toEqual({
      from: '2025-01-01',
      to: '2026-01-01',
      kind: 'contract-year',
      label: 'contract year 1 (2025-01-01..2026-01-01)',
    });
    const m = body.facilities[0].meters[0];

    // the engine on the same data, model and adjustment
    const year1 = REPORTING.slice(0, 12);
    const engine = savingsFromFit(
      FIT,
      { limits: ENGINE.choice.settings.guideline14, excluded: ENGINE.excluded },
      year1,
      WEATHER,
      {
        confidence: 0.9,
        adjustments: [
          {
            id: 'a',
            start: ADJUSTMENT.start,
            end: ADJUSTMENT.end,
            quantity: null,
            perDay: ADJUSTMENT.perDay,
            reason: 'r',
          },
        ],
      },
    );
    expect(m.energy.savings).toBeCloseTo(engine.totals.savings, 6);
    expect(m.energy.adjustments).toBeCloseTo(4600, 9); // hand-worked: 92 days × 50
    expect(m.energy.adjustedBaseline).toBeCloseTo(m.energy.modelBaseline + 4600, 6);
    expect(m.energy.uncertainty).toBeCloseTo(
      Math.max(engine.totals.uncertainty.guideline14.absolute, engine.totals.uncertainty.exact.absolute),
      6,
    );
    expect(m.adjustments).toEqual([
      expect.objectContaining({ reason: ADJUSTMENT.reason, perDay: 50, appliedInWindow: 4600 }),
    ]);
    expect(m.periods).toHaveLength(12);
    // hand-worked: one flat rate of 0.10 USD/kWh, so cost avoided = 0.1 × savings
    expect(m.cost.avoided).toBeCloseTo(0.1 * m.energy.savings, 6);
    expect(m.periods.every((p: any) => p.rate === 0.1)).toBe(true);
    // the brief's standard factors
    expect(m.common.MMBtu.savings).toBeCloseTo(m.energy.savings * KWH_TO_MMBTU, 4);
    expect(m.common.GJ.savings).toBeCloseTo(m.energy.savings * KWH_TO_GJ, 4);
    // normalised savings: 12 months of reporting data, with the normal year we uploaded
    expect(m.normalised).toMatchObject({ available: true, reportingPeriods: 12 });
    expect(body.normalYears).toEqual([
      { stationId, contentHash: expect.stringMatching(/^[0-9a-f]{64}$/), source: 'Invented 30-year mean (test)' },
    ]);

    // measured against guaranteed, in the contract's unit and currency (hand-worked differences)
    const [g] = body.facilities[0].guarantees;
    expect(g).toMatchObject({
      contractYear: 1,
      yearStart: '2025-01-01',
      yearEnd: '2026-01-01',
      measuredThrough: '2026-01-01',
      complete: true,
    });
    expect(g.energy.measured).toBeCloseTo(m.common.MMBtu.savings, 9);
    expect(g.energy.difference).toBeCloseTo(g.energy.measured - 100, 9);
    expect(g.cost.measured).toBeCloseTo(m.cost.avoided, 9);
    expect(g.cost.difference).toBeCloseTo(m.cost.avoided - 2500, 9);
    expect(g.cumulative).toHaveLength(12);
    expect(g.notes).toEqual([]);
    expect(g.cumulative.at(-1).energy).toBeCloseTo(g.energy.measured, 9);

    expect(body.baselines).toEqual([
      expect.objectContaining({ meterId: electricId, contentHash: expect.stringMatching(/^[0-9a-f]{64}$/) }),
    ]);
    expect(body.caution).toMatch(/estimates .* M&V plan.*licensed professional/);
  });

  it('rolls meters up to facilities and the organisation with their residual correlation, leaving out a unit with no standard factor', async () => {
    const body = (await report('quarter=2025-Q3')).json;
    expect(body.window).toMatchObject({ from: '2025-07-01', to: '2025-10-01', kind: 'quarter', label: '2025-Q3' });
    const meters = body.facilities.flatMap((f: any) => f.meters);
    expect(meters.map((m: any) => m.periods.map((p: any) => p.start))).toEqual([
      ['2025-07-01', '2025-08-01', '2025-09-01'],
      ['2025-07-01', '2025-08-01', '2025-09-01'],
      ['2025-07-01', '2025-08-01', '2025-09-01'],
    ]);
    const water = meters.find((m: any) => m.id === waterId);
    expect(water.common).toBeNull();
    expect(water.commonNote).toMatch(/unit m3 has no standard energy factor/);
    expect(body.portfolio).toMatchObject({ meters: 3, metersInRollup: 2 });
    const inRollup = meters.filter((m: any) => m.common !== null);
    const total = inRollup.reduce((s: number, m: any) => s + m.common.MMBtu.savings, 0);
    // hand-worked definition: √(Σv² + Σ_{i≠j} ρ·vᵢ·vⱼ) with the report's pooled correlation (by station)
    const within = body.rollup.withinStation ?? 0;
    const across = body.rollup.acrossStations ?? 0;
    const v = inRollup.map((m: any) => ({ value: m.common.MMBtu.uncertainty, station: m.weatherStationId }));
    let variance = 0;
    for (const a of v)
      for (const b of v)
        variance += a === b ? a.value ** 2 : (a.station === b.station ? within : across) * a.value * b.value;
    expect(body.portfolio.totals.MMBtu.savings).toBeCloseTo(total, 9);
    expect(body.portfolio.totals.MMBtu.uncertainty).toBeCloseTo(Math.sqrt(variance), 9);
    expect(body.portfolio.totals.MMBtu.uncertainty).toBeGreaterThanOrEqual(
      Math.sqrt(v.reduce((s: number, p: any) => s + p.value ** 2, 0)) - 1e-9,
    ); // never narrower than quadrature
    expect(body.rollup.pairsWithinStation + body.rollup.pairsAcrossStations).toBeGreaterThanOrEqual(1);
    expect(body.notices.some((n: string) => n.includes('Annex gas by volume') && n.includes('m3'))).toBe(true);
    expect(body.method.independence).toMatch(/pooled correlation of the report’s meters’ baseline residuals/);
    // a quarter is too short for a reporting-period model: said, not guessed
    expect(meters[0].normalised).toEqual({ available: false, reason: expect.stringMatching(/at least 330/) });
    // the plant's contract year 1 is not over at the end of Q3
    expect(body.facilities[0].guarantees[0]).toMatchObject({
      contractYear: 1,
      measuredThrough: '2025-10-01',
      complete: false,
    });
    expect(body.facilities[0].guarantees[0].cumulative).toHaveLength(9);
  });

  it('flags periods without a contract rate instead of assuming one', async () => {
    const body = (await report(`quarter=2025-Q1&facilityId=${annexId}`)).json;
    const gas = body.facilities[0].meters.find((m: any) => m.id === gasId);
    expect(gas.periods.every((p: any) => p.rate === null && p.costAvoided === null)).toBe(true);
    expect(gas.missingRates).toEqual([{ start: '2025-01-01', end: '2025-04-01' }]);
    expect(gas.cost).toMatchObject({ currency: 'USD', avoided: 0, periodsWithoutRate: 3 });
    expect(body.notices.some((n: string) => n.includes('no contract rate for 2025-01-01..2025-04-01'))).toBe(true);
  });

  it('returns byte-identical JSON and CSV for the same request on the same data, each carrying the content hash', async () => {
    const query = 'from=2025-01-01&to=2025-07-01&confidence=0.9';
    const [a, b] = [await report(`${query}&format=json`), await report(`${query}&format=json`)];
    expect(a.text).toBe(b.text);
    const [c, d] = [await report(`${query}&format=csv`), await report(`${query}&format=csv`, 'integration')];
    expect(c.text).toBe(d.text);
    expect(c.headers['content-type']).toMatch(/^text\/csv/);
    const { contentHash, ...rest } = a.json;
    expect(sha256Hex(canonicalJson(rest))).toBe(contentHash);
    expect(a.headers['x-report-content-hash']).toBe(contentHash);
    expect(c.text).toContain(contentHash);
    expect(c.text.split('\r\n')[0]).toMatch(/^record,facility_id,facility,meter_id/);
    // the CSV states the same totals as the JSON
    const portfolioRow = c.text
      .split('\r\n')
      .find((line) => line.startsWith('portfolio,') && line.includes(',MMBtu,'))!;
    const cells = portfolioRow.split(',');
    const savingsColumn = c.text.split('\r\n')[0]!.split(',').indexOf('savings');
    expect(Number(cells[savingsColumn])).toBeCloseTo(a.json.portfolio.totals.MMBtu.savings, 5);
  });

  it('changes its content hash and data-as-of when the data changes', async () => {
    const before = (await report('quarter=2025-Q4')).json;
    await ok('POST', `/v1/meters/${gasId}/adjustments`, {
      start: '2025-11-01',
      end: '2025-12-01',
      quantity: -300,
      reason: 'East wing closed for the month (test)',
    });
    const after = (await report('quarter=2025-Q4')).json;
    expect(after.dataAsOf.auditSeq).toBeGreaterThan(before.dataAsOf.auditSeq);
    expect(after.contentHash).not.toBe(before.contentHash);
    const gas = after.facilities[1].meters.find((m: any) => m.id === gasId);
    expect(gas.energy.adjustments).toBeCloseTo(-300, 9); // hand-worked: the whole month lies in Q4
  });

  it('serves a printable HTML document with the caution and the content hash', async () => {
    const reply = await report('quarter=2025-Q3&format=html');
    expect(reply.status).toBe(200);
    expect(reply.headers['content-type']).toMatch(/^text\/html/);
    const json = (await report('quarter=2025-Q3')).json;
    expect(reply.text).toContain(json.contentHash);
    expect(reply.text).toContain('licensed professional');
    expect(reply.text).not.toContain('<added>'); // user text escaped
    expect(reply.text).toContain('&lt;added&gt;');
  });

  it('is open to the savings permission and closed to other organisations’ ids', async () => {
    expect((await report('quarter=2025-Q3', 'integration')).status).toBe(200);
    expect((await report(`quarter=2025-Q3&facilityId=${plantId}`, 'other')).status).toBe(404);
  });

  it('answers bad windows and formats with a clear 4xx', async () => {
    const cases: [string, number, RegExp][] = [
      ['quarter=2025-Q5', 400, /quarter/],
      ['quarter=2025-Q3&from=2025-01-01&to=2025-02-01', 400, /exactly one/],
      ['from=2025-01-01', 400, /both from and to/],
      ['from=2025-03-01&to=2025-02-01', 400, /after from/],
      ['quarter=2025-Q3&format=pdf', 400, /format/],
      ['contractYear=4', 422, /runs 3 year/],
      [`contractYear=1&facilityId=${annexId}`, 422, /no facility in the report has a contract/],
      ['quarter=2024-Q1', 422, /no meter .* has reporting data in 2024-Q1/],
      ['quarter=2031-Q1', 422, /no meter .* has reporting data/],
      ['from=2025-01-01&to=2025-02-01&facilityId=fac_nope', 404, /facility fac_nope/],
    ];
    for (const [query, status, detail] of cases) {
      const reply = await report(query);
      expect(reply.status, query).toBe(status);
      expect(reply.headers['content-type'], query).toMatch(/problem\+json/);
      expect(reply.json.detail, query).toMatch(detail);
    }
  });
});

describe('GET /v1/reports/savings over generated windows (fast-check, fixed seed)', () => {
  it('answers every well-formed window with a report whose hash verifies, or a 4xx problem; never 5xx', async () => {
    const isoDay = fc
      .integer({ min: 0, max: 6 * 365 })
      .map((d) => new Date(Date.UTC(2022, 0, 1 + d)).toISOString().slice(0, 10));
    const window = fc.oneof(
      fc.record({
        quarter: fc
          .tuple(fc.integer({ min: 2022, max: 2027 }), fc.integer({ min: 1, max: 4 }))
          .map(([y, q]) => `${y}-Q${q}`),
      }),
      fc.record({ contractYear: fc.integer({ min: 1, max: 4 }) }),
      fc.tuple(isoDay, isoDay).map(([a, b]) => ({ from: a < b ? a : b, to: a < b ? b : a })),
    );
    const query = fc.record(
      {
        window,
        facilityId: fc.constantFrom(plantId, annexId, 'fac_unknown'),
        confidence: fc.constantFrom('0.68', '0.8', '0.9', '0.95'),
        format: fc.constantFrom('json', 'csv', 'html'),
      },
      { requiredKeys: ['window'] },
    );
    const seen = new Map<number, number>();
    await fc.assert(
      fc.asyncProperty(query, async ({ window, ...rest }) => {
        const params = new URLSearchParams(
          Object.entries({ ...window, ...rest }).map(([k, v]): [string, string] => [k, String(v)]),
        );
        const reply = await report(params.toString());
        seen.set(reply.status, (seen.get(reply.status) ?? 0) + 1);
        expect(reply.status, `${params}: ${reply.text.slice(0, 200)}`).toBeLessThan(500);
        if (reply.status !== 200) {
          expect(reply.headers['content-type']).toMatch(/problem\+json/);
          return;
        }
        if ((rest.format ?? 'json') === 'json') {
          const { contentHash, ...body } = reply.json;
          expect(sha256Hex(canonicalJson(body))).toBe(contentHash);
        }
      }),
      { numRuns: 80, seed: 20261202 },
    );
    expect(seen.get(200) ?? 0).toBeGreaterThan(10); // the generator reaches real reports, not only refusals
  });
});

describe('adjustments, rates, contracts and normal years refuse bad input and store nothing', () => {
  const refused = async (
    method: 'POST' | 'PUT',
    url: string,
    body: unknown,
    status: number,
    detail: RegExp,
    csv?: string,
  ) => {
    const before = await databaseDigest(api.store.db);
    const reply = await api.call(method, url, { as: 'engineer', ...(csv === undefined ? { body } : { csv }) });
    expect(reply.status, reply.text).toBe(status);
    expect(reply.json.detail).toMatch(detail);
    expect(await databaseDigest(api.store.db)).toBe(before);
  };

  it('refuses an overlapping adjustment, one inside the baseline window, and one with both or neither figure', async () => {
    await refused(
      'POST',
      `/v1/meters/${electricId}/adjustments`,
      { start: '2025-08-15', end: '2025-10-01', perDay: 5, reason: 'Overlaps (test)' },
      409,
      /overlaps adjustment adj_/,
    );
    await refused(
      'POST',
      `/v1/meters/${electricId}/adjustments`,
      { start: '2024-12-01', end: '2025-02-01', perDay: 5, reason: 'Too early (test)' },
      422,
      /frozen baseline's window/,
    );
    await refused(
      'POST',
      `/v1/meters/${electricId}/adjustments`,
      { start: '2026-01-01', end: '2026-02-01', perDay: 5, quantity: 3, reason: 'Both (test)' },
      400,
      /quantity/,
    );
    await refused(
      'POST',
      `/v1/meters/${electricId}/adjustments`,
      { start: '2026-01-01', end: '2026-02-01', reason: 'Neither (test)' },
      400,
      /quantity/,
    );
    await refused(
      'POST',
      `/v1/meters/${electricId}/adjustments`,
      { start: '2026-02-01', end: '2026-01-01', perDay: 1, reason: 'Backwards (test)' },
      400,
      /end/,
    );
  });

  it('refuses a rate schedule with a gap, an overlap or a bad currency, naming the entry', async () => {
    const gap = {
      currency: 'USD',
      rates: [
        { from: '2025-01-01', to: '2025-07-01', price: 0.1 },
        { from: '2025-08-01', price: 0.11 },
      ],
    };
    await refused('PUT', `/v1/meters/${electricId}/rates`, gap, 400, /rates\[1\].*gap.*2025-07-01.*2025-08-01/);
    const overlap = {
      currency: 'USD',
      rates: [
        { from: '2025-01-01', to: '2025-09-01', price: 0.1 },
        { from: '2025-08-01', price: 0.11 },
      ],
    };
    await refused('PUT', `/v1/meters/${electricId}/rates`, overlap, 400, /rates\[1\]/);
    await refused('PUT', `/v1/meters/${electricId}/rates`, { currency: 'usd', rates: [] }, 400, /currency/);
    await refused(
      'PUT',
      `/v1/meters/${electricId}/rates`,
      { currency: 'USD', rates: [{ from: '2025-01-01', price: -1 }] },
      400,
      /price/,
    );
  });

  it('refuses a contract with a guarantee beyond its years, a repeated year, an unknown energy unit or a cost without currency', async () => {
    const base = { start: '2025-01-01', years: 2, currency: 'USD', energyUnit: 'MMBtu' };
    await refused(
      'PUT',
      `/v1/facilities/${annexId}/contract`,
      { ...base, guarantees: [{ year: 3, energy: 1 }] },
      400,
      /guarantees\[0\]\.year/,
    );
    await refused(
      'PUT',
      `/v1/facilities/${annexId}/contract`,
      {
        ...base,
        guarantees: [
          { year: 1, energy: 1 },
          { year: 1, cost: 2 },
        ],
      },
      400,
      /guaranteed twice/,
    );
    await refused(
      'PUT',
      `/v1/facilities/${annexId}/contract`,
      { ...base, energyUnit: 'm3', guarantees: [] },
      400,
      /energyUnit/,
    );
    await refused(
      'PUT',
      `/v1/facilities/${annexId}/contract`,
      { ...base, currency: null, guarantees: [{ year: 1, cost: 5 }] },
      400,
      /currency/,
    );
  });

  it('refuses a normal year with a missing day or a leap day, and takes one as CSV with its source header', async () => {
    const days = normalYear();
    await refused(
      'PUT',
      `/v1/weather-stations/${stationId}/normal-year`,
      { source: 'Short (test)', days: days.slice(1) },
      400,
      /01-01/,
    );
    await refused(
      'PUT',
      `/v1/weather-stations/${stationId}/normal-year`,
      { source: 'Leap (test)', days: [...days, { day: '02-29', temp: 40 }] },
      400,
      /02-29/,
    );
    const csv = `day,temp\n${days.map((d) => `${d.day},${d.temp + 1}`).join('\n')}\n`;
    const reply = await api.call('PUT', `/v1/weather-stations/${stationId}/normal-year`, {
      as: 'engineer',
      csv,
      headers: { 'x-normal-year-source': 'Invented warmer normals (test)' },
    });
    expect(reply.status, reply.text).toBe(200);
    expect(reply.json).toMatchObject({
      source: 'Invented warmer normals (test)',
      days: expect.arrayContaining([{ day: '01-01', temp: days[0]!.temp + 1 }]),
    });
    const read = await api.call('GET', `/v1/weather-stations/${stationId}/normal-year`, { as: 'analyst' });
    expect(read.json.contentHash).toBe(reply.json.contentHash);
  });

  it('withdraws an adjustment recorded in error: it stops counting, stays on record, and frees its days', async () => {
    const created = await ok('POST', `/v1/meters/${gasId}/adjustments`, {
      start: '2026-02-01',
      end: '2026-03-01',
      quantity: 560,
      reason: 'Recorded on the wrong meter (test)',
    });
    const before = (
      await api.call('GET', `/v1/meters/${gasId}/savings?from=2026-02-01&to=2026-03-02`, { as: 'analyst' })
    ).json;
    expect(before.totals.adjustments).toBeCloseTo(560, 9); // hand-worked: the whole of February lies in the window
    const withdrawn = await api.call('POST', `/v1/adjustments/${created.id}/withdraw`, {
      as: 'engineer',
      body: { reason: 'Belongs to another meter (test)' },
    });
    expect(withdrawn.status, withdrawn.text).toBe(200);
    expect(withdrawn.json.withdrawn).toMatchObject({ reason: 'Belongs to another meter (test)' });
    const after = (
      await api.call('GET', `/v1/meters/${gasId}/savings?from=2026-02-01&to=2026-03-02`, { as: 'analyst' })
    ).json;
    expect(after.totals.adjustments).toBe(0);
    expect(after.totals.savings).toBeCloseTo(before.totals.savings - 560, 6);
    const listed = (await api.call('GET', `/v1/meters/${gasId}/adjustments`, { as: 'analyst' })).json.adjustments;
    expect(listed.find((a: any) => a.id === created.id).withdrawn).not.toBeNull();
    await refused(
      'POST',
      `/v1/adjustments/${created.id}/withdraw`,
      { reason: 'Again (test)' },
      409,
      /already withdrawn/,
    );
    await refused(
      'POST',
      `/v1/adjustments/adj_unknown/withdraw`,
      { reason: 'Nothing (test)' },
      404,
      /adjustment adj_unknown/,
    );
    // its days are free again
    await ok('POST', `/v1/meters/${gasId}/adjustments`, {
      start: '2026-02-01',
      end: '2026-03-01',
      perDay: 1,
      reason: 'The right figure (test)',
    });
  });

  it('reads back what was stored, and audits every change', async () => {
    expect((await api.call('GET', `/v1/meters/${gasId}/rates`, { as: 'analyst' })).json).toMatchObject({
      currency: 'USD',
      rates: [
        { from: '2025-04-01', to: '2026-01-01', price: 1.2, escalation: 0 },
        { from: '2026-01-01', to: null },
      ],
    });
    expect((await api.call('GET', `/v1/facilities/${plantId}/contract`, { as: 'analyst' })).json).toMatchObject({
      start: '2025-01-01',
      years: 3,
      energyUnit: 'MMBtu',
    });
    expect(
      (await api.call('GET', `/v1/meters/${electricId}/adjustments`, { as: 'analyst' })).json.adjustments,
    ).toHaveLength(1);
    expect((await api.call('GET', `/v1/facilities/${annexId}/contract`, { as: 'analyst' })).status).toBe(404);
    const audit = await api.call('GET', '/v1/audit?limit=500', { as: 'admin' });
    const actions = new Set(audit.json.entries.map((e: any) => e.action));
    for (const action of ['put-rates', 'put-contract', 'put-normal-year']) expect(actions).toContain(action);
    expect((await api.call('GET', '/v1/audit/verify', { as: 'admin' })).json.ok).toBe(true);
  });

  it('says what limits a guarantee comparison: meters left out, meters without rates, periods without a rate', async () => {
    await ok('PUT', `/v1/facilities/${annexId}/contract`, {
      start: '2025-01-01',
      years: 2,
      currency: 'USD',
      energyUnit: 'MMBtu',
      guarantees: [{ year: 1, energy: 10, cost: 100 }],
    });
    const body = (await report(`contractYear=1&facilityId=${annexId}`)).json;
    const [g] = body.facilities[0].guarantees;
    expect(g.notes).toEqual([
      'energy measured without Annex gas by volume (no standard energy factor)',
      'cost measured from 1 of 2 meters (the others have no rates in USD)',
      '3 period(s) without a contract rate count no cost', // hand-worked: the gas meter's January to March 2025 bills
    ]);
    expect(body.notices).toContain(`Invented annex, contract year 1: ${g.notes[1]}`);
  });
});
