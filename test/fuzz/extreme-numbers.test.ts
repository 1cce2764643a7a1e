/**
 * Extreme finite numbers through every route that stores a number, then
 * every report and chart drawn from them. A reading near the largest double
 * once made every chart over it loop and abort the process; the input
 * bounds of src/engine/bounds.ts now refuse such figures, and the charts
 * end on any finite input.
 *
 * Each run (fast-check, fixed seed) builds a facility from scratch with
 * numbers at the edges the bounds admit (exactly the bound, zero, the
 * smallest subnormal, temperatures at the plausible extremes, a rate
 * escalating at the largest yearly fraction since year 0001), as JSON or
 * CSV, and checks (the API contract; the bounds are our own):
 *  - every admitted edge is stored (2xx);
 *  - a value just beyond each bound is refused with 400 naming the field or
 *    CSV row, and the database is unchanged afterwards;
 *  - savings, the signature chart, and the report as JSON, CSV and HTML
 *    for a quarter, a contract year and a date range answer below 500
 *    (a report 200 or 422), and no body holds a NaN or Infinity token;
 *  - a figure that still cannot be finite (a cost escalated over 2,000
 *    years) is labelled not available in the report's notices.
 * A guard reads the OpenAPI document: every route whose body takes a
 * number must be driven here.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import fc from 'fast-check';
import {
  MAX_COST_PER_DAY,
  MAX_FLOOR_AREA,
  MAX_GUARANTEE_COST,
  MAX_GUARANTEE_ENERGY,
  MAX_PRICE,
  MAX_USE_PER_DAY,
  NORMAL_YEAR_DAYS,
  type DailyTemperature,
} from '../../src/engine/index.js';
import { PLAUSIBLE_TEMPERATURE_F } from '../../src/engine/units.js';
import { MAX_VARIABLE_MAGNITUDE } from '../../src/domain/limits.js';
import { makeTestApi, type ApiResponse, type TestApi } from '../support/api.js';
import { databaseDigest } from '../support/db-digest.js';
import { testDialect } from '../support/database.js';
import { CLIMATES, SAMPLE_BUILDING, dailyWeather, monthlyReadings, seededRandom } from '../support/synthetic.js';
import { resolveRefs, routeName, routesFromOpenApi, type JsonSchema } from './openapi-routes.js';

const SEED = 1_7_2026;
// PostgreSQL answers each request more slowly; fewer runs keep the file at a few seconds.
const RUNS = testDialect() === 'postgres' ? 3 : 10;

/** The routes this test drives, by the numbers each takes. */
const DRIVEN = [
  'POST /v1/facilities',
  'PUT /v1/weather-stations/{id}/observations',
  'PUT /v1/weather-stations/{id}/normal-year',
  'POST /v1/meters/{id}/readings',
  'POST /v1/meters/{id}/baselines',
  'PUT /v1/meters/{id}/rates',
  'POST /v1/meters/{id}/adjustments',
  'PUT /v1/facilities/{id}/contract',
  'POST /v1/statements',
  'POST /v1/variables/{id}/values',
  // Small whole-number settings (days, years) with their own bounds; at and beyond them in test/http/weather-imports.test.ts.
  'POST /v1/weather-stations/{id}/gap-fills',
  'POST /v1/weather-stations/{id}/normal-year/from-history',
];

/** The next double above a positive x: "just beyond" a bound. */
function nextUp(x: number): number {
  const view = new DataView(new ArrayBuffer(8));
  view.setFloat64(0, x);
  view.setBigUint64(0, view.getBigUint64(0) + 1n);
  return view.getFloat64(0);
}

/** A figure per day at the edges a bound admits: 0, the smallest subnormal, anything up to the bound, the bound itself. */
const perDayEdge = (max: number) =>
  fc.oneof(fc.constantFrom(0, Number.MIN_VALUE, max), fc.double({ min: 0, max, noNaN: true }));
/** As perDayEdge, either sign. */
const signedEdge = (max: number) =>
  fc.oneof(fc.constantFrom(-max, max, -Number.MIN_VALUE, Number.MIN_VALUE), fc.double({ min: -max, max, noNaN: true }));
/** Just beyond a bound: the next double up, a factor of 1 + 10⁻⁹, or the largest double. */
const beyond = (max: number) => fc.constantFrom(nextUp(max), max * (1 + 1e-9), Number.MAX_VALUE);
/** Just beyond a bound per day (the next double up could round back onto the bound once multiplied by the days and divided again). */
const beyondPerDay = (max: number) => fc.constantFrom(max * (1 + 1e-9), Number.MAX_VALUE);
/** A figure per day times days, held finite (JSON would send Infinity as null). */
const total = (perDay: number, days: number) => Math.min(perDay * days, Number.MAX_VALUE);
const { min: COLDEST, max: HOTTEST } = PLAUSIBLE_TEMPERATURE_F;

const scenario = fc.record({
  csv: fc.boolean(),
  baselineUsePerDay: perDayEdge(MAX_USE_PER_DAY.max),
  usePerDay: fc.array(perDayEdge(MAX_USE_PER_DAY.max), { minLength: 12, maxLength: 12 }),
  costPerDay: fc.array(fc.option(perDayEdge(MAX_COST_PER_DAY.max)), { minLength: 12, maxLength: 12 }),
  edgeTemps: fc.array(fc.constantFrom(COLDEST, HOTTEST), { minLength: 1, maxLength: 6 }),
  normalTemp: fc.constantFrom(COLDEST, HOTTEST),
  floorArea: fc.oneof(
    fc.constantFrom(Number.MIN_VALUE, MAX_FLOOR_AREA.max),
    fc.double({ min: Number.MIN_VALUE, max: MAX_FLOOR_AREA.max, noNaN: true }),
  ),
  options: fc.record({
    minCoverage: fc.constantFrom(Number.MIN_VALUE, 1),
    significanceLevel: fc.constantFrom(Number.MIN_VALUE, 1 - 2 ** -53),
    minPointsPerSegment: fc.constantFrom(1, 1000),
  }),
  price: fc.oneof(
    fc.constantFrom(0, Number.MIN_VALUE, MAX_PRICE.max),
    fc.double({ min: 0, max: MAX_PRICE.max, noNaN: true }),
  ),
  escalation: fc.constantFrom(1, 0, -1 + 2 ** -52, 0.5),
  rateFrom: fc.constantFrom('0001-01-01', '1900-01-01', '2025-01-01'),
  adjustment: fc.oneof(
    fc.record({ perDay: signedEdge(MAX_USE_PER_DAY.max) }),
    fc.record({ quantityPerDay: signedEdge(MAX_USE_PER_DAY.max) }),
  ),
  energyGuarantee: signedEdge(MAX_GUARANTEE_ENERGY.max),
  costGuarantee: signedEdge(MAX_GUARANTEE_COST.max),
  beyondUse: beyondPerDay(MAX_USE_PER_DAY.max),
  beyondCost: beyondPerDay(MAX_COST_PER_DAY.max),
  beyondPrice: beyond(MAX_PRICE.max),
  beyondFloor: beyond(MAX_FLOOR_AREA.max),
  beyondEnergy: beyond(MAX_GUARANTEE_ENERGY.max),
  beyondGuaranteeCost: beyond(MAX_GUARANTEE_COST.max),
  beyondTemp: fc.constantFrom(nextUp(HOTTEST), -nextUp(-COLDEST), Number.MAX_VALUE),
});
type Scenario = typeof scenario extends fc.Arbitrary<infer T> ? T : never;

let api: TestApi;
let weather: DailyTemperature[];
/** Every answer of the run, for the "never a 5xx" property. */
const answers: { what: string; status: number }[] = [];
const figures = { runs: 0, requests: 0, refused: 0, reports: 0, unprocessable: 0, notAvailableNotices: 0 };

beforeAll(async () => {
  api = await makeTestApi();
  // synthetic: the test sets the truth. Three years of an invented temperate climate.
  weather = dailyWeather(CLIMATES.temperate, '2023-01-01', 1096, seededRandom(17));
});
afterAll(async () => {
  console.log(`extreme-numbers summary ${JSON.stringify({ seed: SEED, dialect: testDialect(), ...figures })}`);
  await api?.close();
});

async function send(
  what: string,
  method: 'GET' | 'POST' | 'PUT',
  url: string,
  options: { body?: unknown; csv?: string; headers?: Record<string, string> } = {},
): Promise<ApiResponse> {
  const reply = await api.call(method, url, { as: 'admin', ...options });
  answers.push({ what, status: reply.status });
  figures.requests++;
  expect(reply.status, `${what}: ${reply.text.slice(0, 400)}`).toBeLessThan(500);
  expect(nonFinite(reply.text), `${what} leaked a non-finite token`).toEqual([]);
  return reply;
}

async function stored(
  what: string,
  method: 'POST' | 'PUT',
  url: string,
  options: { body?: unknown; csv?: string; headers?: Record<string, string> },
): Promise<any> {
  const reply = await send(what, method, url, options);
  expect([200, 201], `${what}: ${reply.text.slice(0, 400)}`).toContain(reply.status);
  return reply.json;
}

/** Send a value beyond a bound and expect a 400 that names `field` (a JSON path, or a CSV row and field). */
async function refused(
  what: string,
  method: 'POST' | 'PUT',
  url: string,
  options: { body?: unknown; csv?: string; headers?: Record<string, string> },
  field: RegExp,
): Promise<void> {
  const reply = await send(what, method, url, options);
  figures.refused++;
  expect(reply.status, `${what}: ${reply.text.slice(0, 400)}`).toBe(400);
  expect(reply.headers['content-type']).toMatch(/^application\/problem\+json/);
  const named = [
    reply.json.detail as string,
    ...((reply.json.errors ?? []) as { field: string }[]).map((e) => e.field),
  ];
  expect(
    named.some((text) => field.test(text)),
    `${what} should name ${field}: ${reply.text.slice(0, 400)}`,
  ).toBe(true);
}

function nonFinite(text: string): string[] {
  return text.match(/\b(?:NaN|-?Infinity)\b/g) ?? [];
}

function csvOf(columns: string[], rows: (string | number | null | undefined)[][]): string {
  return [
    columns.join(','),
    ...rows.map((row) => row.map((cell) => (cell === null || cell === undefined ? '' : String(cell))).join(',')),
  ].join('\n');
}

/** Days of [start, end). */
const daysOf = (r: { start: string; end: string }) =>
  Math.round((Date.parse(r.end) - Date.parse(r.start)) / 86_400_000);

async function runScenario(s: Scenario, run: number): Promise<void> {
  figures.runs++;
  const tag = `run ${run}`;
  const facility = await stored(`${tag} facility`, 'POST', '/v1/facilities', {
    body: { name: `Extreme works ${run} (invented)`, floorArea: s.floorArea },
  });

  // Weather at the plausible extremes on a few reporting days, and a normal year all at one extreme.
  const station = await stored(`${tag} station`, 'POST', '/v1/weather-stations', {
    body: { name: `Extreme station ${run}`, temperatureUnit: 'F' },
  });
  const days = weather.map((d, i) =>
    i >= 731 && i - 731 < s.edgeTemps.length ? { date: d.date, temp: s.edgeTemps[i - 731]! } : d,
  );
  const observationsUrl = `/v1/weather-stations/${station.id}/observations`;
  if (s.csv)
    await stored(`${tag} observations (CSV)`, 'PUT', observationsUrl, {
      csv: csvOf(
        ['date', 'temp'],
        days.map((d) => [d.date, d.temp]),
      ),
    });
  else
    await stored(`${tag} observations`, 'PUT', observationsUrl, {
      body: { observations: [...days.slice(0, -1), { date: days.at(-1)!.date, tmin: COLDEST, tmax: HOTTEST }] },
    });
  const normalUrl = `/v1/weather-stations/${station.id}/normal-year`;
  const normal = NORMAL_YEAR_DAYS.map((day) => ({ day, temp: s.normalTemp }));
  if (s.csv)
    await stored(`${tag} normal year (CSV)`, 'PUT', normalUrl, {
      csv: csvOf(
        ['day', 'temp'],
        normal.map((d) => [d.day, d.temp]),
      ),
      headers: { 'x-normal-year-source': 'Invented extreme year (test)' },
    });
  else
    await stored(`${tag} normal year`, 'PUT', normalUrl, {
      body: { source: 'Invented extreme year (test)', days: normal },
    });

  const meter = await stored(`${tag} meter`, 'POST', `/v1/facilities/${facility.id}/meters`, {
    body: { name: `Extreme meter ${run}`, fuel: 'electricity', unit: 'kWh', weatherStationId: station.id },
  });
  // Two years of ordinary bills with one at the edge of the use-per-day bound, then a year of reporting bills all at edges.
  const random = seededRandom(run + 1);
  const baseline = monthlyReadings(SAMPLE_BUILDING, weather, '2023-01-01', 24, random).map((r, i) => ({
    start: r.start,
    end: r.end,
    quantity: i === 5 ? s.baselineUsePerDay * daysOf(r) : Math.round(r.quantity),
    cost: null as number | null,
  }));
  const reporting = monthlyReadings(SAMPLE_BUILDING, weather, '2025-01-01', 12, random).map((r, i) => ({
    start: r.start,
    end: r.end,
    quantity: Math.min(s.usePerDay[i]! * daysOf(r), MAX_USE_PER_DAY.max * daysOf(r)),
    cost: s.costPerDay[i] === null ? null : Math.min(s.costPerDay[i]! * daysOf(r), MAX_COST_PER_DAY.max * daysOf(r)),
  }));
  const readings = [...baseline, ...reporting];
  const readingsUrl = `/v1/meters/${meter.id}/readings`;
  if (s.csv)
    await stored(`${tag} readings (CSV)`, 'POST', readingsUrl, {
      csv: csvOf(
        ['start', 'end', 'quantity', 'cost'],
        readings.map((r) => [r.start, r.end, r.quantity, r.cost]),
      ),
    });
  else
    await stored(`${tag} readings`, 'POST', readingsUrl, {
      body: {
        readings: readings.map((r) => (r.cost === null ? { start: r.start, end: r.end, quantity: r.quantity } : r)),
      },
    });

  // A draft at the options' edges (it may fit or say why not), then the frozen baseline.
  await send(`${tag} baseline at option edges`, 'POST', `/v1/meters/${meter.id}/baselines`, {
    body: { start: '2023-01-01', end: '2025-01-01', options: s.options },
  });
  const draft = await send(`${tag} baseline`, 'POST', `/v1/meters/${meter.id}/baselines`, {
    body: { start: '2023-01-01', end: '2025-01-01' },
  });
  let baselineId: string | null = null;
  if (draft.status === 201) {
    baselineId = draft.json.id;
    await stored(`${tag} freeze`, 'POST', `/v1/baselines/${baselineId}/freeze`, {
      body: { note: 'Agreed in the invented M&V plan (test)' },
    });
    const adjustment =
      'perDay' in s.adjustment
        ? { perDay: s.adjustment.perDay }
        : {
            quantity:
              Math.sign(s.adjustment.quantityPerDay) *
              Math.min(Math.abs(s.adjustment.quantityPerDay) * 28, MAX_USE_PER_DAY.max * 28),
          };
    await stored(`${tag} adjustment`, 'POST', `/v1/meters/${meter.id}/adjustments`, {
      body: { start: '2025-02-01', end: '2025-03-01', ...adjustment, reason: 'Invented extreme change (test)' },
    });
  } else {
    expect(draft.status, `${tag} baseline: ${draft.text.slice(0, 300)}`).toBe(422);
  }
  await stored(`${tag} rates`, 'PUT', `/v1/meters/${meter.id}/rates`, {
    body: { currency: 'USD', rates: [{ from: s.rateFrom, price: s.price, escalation: s.escalation }] },
  });
  await stored(`${tag} contract`, 'PUT', `/v1/facilities/${facility.id}/contract`, {
    body: {
      start: '2025-01-01',
      years: 2,
      currency: 'USD',
      energyUnit: 'kWh',
      guarantees: [
        { year: 1, energy: s.energyGuarantee, cost: s.costGuarantee },
        { year: 2, energy: -s.energyGuarantee },
      ],
    },
  });

  // An independent variable with values at both edges of its bound (domain/limits.ts), after the frozen window.
  const variable = await stored(`${tag} variable`, 'POST', `/v1/facilities/${facility.id}/variables`, {
    body: { name: `output ${run}`, unit: 'units', kind: 'per-period', aggregation: 'total' },
  });
  const valuesUrl = `/v1/variables/${variable.id}/values`;
  await stored(`${tag} variable values at the edges`, 'POST', valuesUrl, {
    body: {
      values: [
        { start: '2025-01-01', end: '2025-02-01', value: MAX_VARIABLE_MAGNITUDE },
        { start: '2025-02-01', end: '2025-03-01', value: -MAX_VARIABLE_MAGNITUDE },
        { start: '2025-03-01', end: '2025-04-01', value: Number.MIN_VALUE },
      ],
    },
  });

  // Just beyond every bound: refused, naming the field, and nothing stored.
  const before = await databaseDigest(api.store.db);
  await refused(
    `${tag} floor area beyond`,
    'POST',
    '/v1/facilities',
    { body: { name: 'Beyond', floorArea: s.beyondFloor } },
    /^floorArea$/,
  );
  const bill = reporting[3]!;
  if (s.csv) {
    await refused(
      `${tag} quantity beyond (CSV)`,
      'POST',
      readingsUrl,
      {
        csv: csvOf(
          ['start', 'end', 'quantity'],
          [
            ['2026-06-01', '2026-06-02', 1],
            ['2026-06-02', '2026-06-03', s.beyondUse],
          ],
        ),
      },
      /^row 3, field quantity$/,
    );
    await refused(
      `${tag} cost beyond (CSV)`,
      'POST',
      readingsUrl,
      { csv: csvOf(['start', 'end', 'quantity', 'cost'], [['2026-06-01', '2026-06-03', 1, total(s.beyondCost, 2)]]) },
      /^row 2, field cost$/,
    );
    await refused(
      `${tag} temperature beyond (CSV)`,
      'PUT',
      observationsUrl,
      {
        csv: csvOf(
          ['date', 'temp'],
          [
            ['2026-06-01', 50],
            ['2026-06-02', s.beyondTemp],
          ],
        ),
      },
      /^row 3, field temp$/,
    );
  } else {
    await refused(
      `${tag} quantity beyond`,
      'POST',
      readingsUrl,
      {
        body: {
          readings: [
            { start: '2026-06-01', end: '2026-06-02', quantity: 1 },
            { start: '2026-06-02', end: '2026-06-03', quantity: s.beyondUse },
          ],
        },
      },
      /^readings\[1\]\.quantity$/,
    );
    await refused(
      `${tag} quantity of a long bill beyond`,
      'POST',
      readingsUrl,
      {
        body: {
          readings: [{ start: '2026-01-01', end: '2026-07-01', quantity: MAX_USE_PER_DAY.max * 181 * (1 + 1e-9) }],
        },
      },
      /^readings\[0\]\.quantity$/,
    );
    await refused(
      `${tag} cost beyond`,
      'POST',
      readingsUrl,
      {
        body: {
          readings: [
            { start: bill.start, end: bill.end, quantity: bill.quantity, cost: total(s.beyondCost, daysOf(bill)) },
          ],
          correctionReason: 'test',
        },
      },
      /^readings\[0\]\.cost$/,
    );
    await refused(
      `${tag} temperature beyond`,
      'PUT',
      observationsUrl,
      { body: { observations: [{ date: '2026-06-01', tmin: 20, tmax: s.beyondTemp }] } },
      /^observations\[0\]\.tmax$/,
    );
  }
  await refused(
    `${tag} normal year beyond`,
    'PUT',
    normalUrl,
    { body: { source: 'Beyond (test)', days: normal.map((d, i) => (i === 100 ? { ...d, temp: s.beyondTemp } : d)) } },
    /^days\[100\]\.temp$/,
  );
  await refused(
    `${tag} price beyond`,
    'PUT',
    `/v1/meters/${meter.id}/rates`,
    { body: { currency: 'USD', rates: [{ from: '2025-01-01', price: s.beyondPrice }] } },
    /^rates\[0\]\.price$/,
  );
  await refused(
    `${tag} escalation beyond`,
    'PUT',
    `/v1/meters/${meter.id}/rates`,
    { body: { currency: 'USD', rates: [{ from: '2025-01-01', price: 1, escalation: nextUp(1) }] } },
    /^rates\[0\]\.escalation$/,
  );
  await refused(
    `${tag} perDay beyond`,
    'POST',
    `/v1/meters/${meter.id}/adjustments`,
    { body: { start: '2026-02-01', end: '2026-03-01', perDay: -s.beyondUse, reason: 'Beyond (test)' } },
    /^perDay$/,
  );
  await refused(
    `${tag} adjustment quantity beyond`,
    'POST',
    `/v1/meters/${meter.id}/adjustments`,
    { body: { start: '2026-02-01', end: '2026-03-01', quantity: total(s.beyondUse, 28), reason: 'Beyond (test)' } },
    /^quantity$/,
  );
  await refused(
    `${tag} guarantees beyond`,
    'PUT',
    `/v1/facilities/${facility.id}/contract`,
    {
      body: {
        start: '2025-01-01',
        years: 2,
        currency: 'USD',
        energyUnit: 'kWh',
        guarantees: [
          { year: 1, energy: s.beyondEnergy },
          { year: 2, cost: -s.beyondGuaranteeCost },
        ],
      },
    },
    /^guarantees\[[01]\]\.(energy|cost)$/,
  );
  await refused(
    `${tag} statement contract year beyond`,
    'POST',
    '/v1/statements',
    { body: { window: { contractYear: 51 }, facilityId: facility.id } },
    /^window\.contractYear$/,
  );
  await refused(
    `${tag} statement confidence off the list`,
    'POST',
    '/v1/statements',
    { body: { window: { quarter: '2025-Q1' }, facilityId: facility.id, confidence: Number.MAX_VALUE } },
    /^confidence$/,
  );
  await refused(
    `${tag} variable value beyond`,
    'POST',
    valuesUrl,
    { body: { values: [{ start: '2025-04-01', end: '2025-05-01', value: nextUp(MAX_VARIABLE_MAGNITUDE) }] } },
    /^values\[0\]\.value$/,
  );
  expect(await databaseDigest(api.store.db), `${tag}: a refused request stored something`).toBe(before);

  // Every reading of what was stored: lists, savings, the signature chart, the reports.
  for (const url of [
    `/v1/facilities/${facility.id}`,
    `/v1/facilities/${facility.id}/contract`,
    readingsUrl,
    `/v1/meters/${meter.id}/rates`,
    `/v1/meters/${meter.id}/adjustments`,
    valuesUrl,
    observationsUrl,
    normalUrl,
    `/v1/meters/${meter.id}/baselines`,
  ]) {
    expect((await send(`${tag} GET ${url}`, 'GET', url)).status).toBe(200);
  }
  if (baselineId !== null) {
    expect((await send(`${tag} baseline`, 'GET', `/v1/baselines/${baselineId}`)).status).toBe(200);
    const svg = await send(`${tag} signature`, 'GET', `/v1/baselines/${baselineId}/signature.svg`);
    expect(svg.status).toBe(200);
    expect((await send(`${tag} savings`, 'GET', `/v1/meters/${meter.id}/savings?confidence=0.95`)).status).toBe(200);
  }
  for (const window of ['quarter=2025-Q1', 'contractYear=1', 'from=2024-12-01&to=2026-02-01']) {
    for (const format of ['json', 'csv', 'html']) {
      const reply = await send(
        `${tag} report ${window} ${format}`,
        'GET',
        `/v1/reports/savings?${window}&facilityId=${facility.id}&format=${format}`,
      );
      figures.reports++;
      expect([200, 422], `${tag} report ${window} ${format}: ${reply.text.slice(0, 300)}`).toContain(reply.status);
      if (reply.status === 422) figures.unprocessable++;
      if (reply.status === 200 && format === 'json')
        figures.notAvailableNotices += (reply.json.notices as string[]).filter((n) =>
          n.includes('not available'),
        ).length;
    }
  }
  // A statement of the contract year: issued (its stored HTML served) or refused as unprocessable, never a 5xx.
  const statement = await send(`${tag} statement`, 'POST', '/v1/statements', {
    body: { window: { contractYear: 1 }, facilityId: facility.id, confidence: 0.95 },
  });
  expect([201, 422], `${tag} statement: ${statement.text.slice(0, 300)}`).toContain(statement.status);
  if (statement.status === 201)
    expect(
      (await send(`${tag} statement html`, 'GET', `/v1/statements/${statement.json.id}/document?format=html`)).status,
    ).toBe(200);
}

describe(`extreme finite numbers on ${testDialect()}: stored at the bounds' edges, refused beyond them, reported without a 5xx`, () => {
  it('drives every route whose request body takes a number', () => {
    const document = api.app.swagger() as { components?: { schemas?: Record<string, JsonSchema> } };
    const takesNumber = (schema: JsonSchema | null): boolean => {
      if (!schema) return false;
      const resolved = resolveRefs(schema, document.components?.schemas ?? {});
      const types = Array.isArray(resolved.type) ? resolved.type : [resolved.type];
      if (types.includes('number') || types.includes('integer')) return true;
      return [
        ...Object.values(resolved.properties ?? {}),
        ...(resolved.items ? [resolved.items] : []),
        ...(resolved.anyOf ?? []),
        ...(resolved.oneOf ?? []),
        ...(resolved.allOf ?? []),
      ].some(takesNumber);
    };
    const withNumbers = routesFromOpenApi(document)
      .filter((route) => takesNumber(route.body))
      .map(routeName)
      .sort();
    expect(withNumbers).toEqual([...DRIVEN].sort());
  });

  it('stores the edges, refuses just beyond them naming the field, and reports all of it without a 5xx or a non-finite token', async () => {
    let run = 0;
    await fc.assert(
      fc.asyncProperty(scenario, async (s) => {
        await runScenario(s, run++);
      }),
      { seed: SEED, numRuns: RUNS, endOnFailure: true },
    );
    expect(answers.filter((a) => a.status >= 500)).toEqual([]);
  });

  it('labels a cost escalated past the finite range as not available', async () => {
    // synthetic: the test sets the truth. A price doubling every year since 0001 reaches 2^2024 by 2025: beyond any double.
    const scenarioValue: Scenario = fc.sample(scenario, { seed: SEED, numRuns: 1 })[0]!;
    const fixed: Scenario = {
      ...scenarioValue,
      baselineUsePerDay: 300,
      rateFrom: '0001-01-01',
      escalation: 1,
      price: 1,
      usePerDay: scenarioValue.usePerDay.map(() => 100),
      costPerDay: scenarioValue.costPerDay.map(() => null),
    };
    const before = figures.notAvailableNotices;
    await runScenario(fixed, 1000);
    expect(figures.notAvailableNotices).toBeGreaterThan(before);
  });
});
