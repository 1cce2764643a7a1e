import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { makeTestApi, type TestApi } from '../support/api.js';
import { databaseDigest } from '../support/db-digest.js';
import { createFacility } from '../../src/services/facilities.js';
import { createMeter } from '../../src/services/meters.js';
import { parseApiKey } from '../../src/store/api-keys.js';
import { verifyAllAuditChains } from '../../src/store/audit.js';
import { insertBareBaseline } from '../support/baseline-rows.js';
import { dlyLine, GHCN_ID, GSOD_HEADER, GSOD_ID, gsodRow, repeat, type Slot } from '../station-archives/fixtures.js';

// Files constructed to the published layouts with invented ids and values (see ../station-archives/fixtures.ts).
// Check values: hand-worked from those files unless a comment names another source.

let api: TestApi;
let celsius: string;

async function station(unit: 'F' | 'C', name: string): Promise<string> {
  return (await api.call('POST', '/v1/weather-stations', { body: { name, temperatureUnit: unit } })).json.id;
}

async function frozenBaselineOn(stationId: string, id: string, start: string, end: string): Promise<void> {
  const ctx = {
    store: api.store,
    principal: { keyId: parseApiKey(api.keys.admin)!.id, organisationId: api.organisationId, role: 'admin' as const },
    now: '2026-01-01T00:00:00.000Z',
  };
  const facility = await createFacility(ctx, { name: 'Depot D4 (invented)' });
  const meter = await createMeter(ctx, facility.id, {
    name: 'Gas',
    fuel: 'natural gas',
    unit: 'therm',
    weatherStationId: stationId,
  });
  await insertBareBaseline(api.store.db, {
    id,
    organisationId: api.organisationId,
    meterId: meter.id,
    start,
    end,
    status: 'frozen',
  });
}

async function refused(method: 'POST', path: string, options: Parameters<TestApi['call']>[2]) {
  const before = await databaseDigest(api.store.db);
  const response = await api.call(method, path, options);
  expect(await databaseDigest(api.store.db)).toBe(before);
  return response;
}

const febMax: Slot[] = repeat(100, 29); // February 2024: 29 days
const febMin: Slot[] = repeat(-20, 29);
febMin[5] = [-35, ' ', 'I', 'S']; // 6 Feb fails the internal consistency check
febMin[6] = [-9999]; // 7 Feb missing
const DLY = [
  dlyLine(GHCN_ID, 2024, 2, 'TMAX', febMax),
  dlyLine(GHCN_ID, 2024, 2, 'TMIN', febMin),
  dlyLine(GHCN_ID, 2024, 2, 'PRCP', repeat(0, 29)),
].join('\n');

beforeEach(async () => {
  api = await makeTestApi();
  celsius = await station('C', 'Station north (invented)');
});

afterEach(async () => {
  expect((await verifyAllAuditChains(api.store.db)).ok).toBe(true);
  await api.close();
});

describe('POST /v1/weather-stations/{id}/imports', () => {
  it('imports a .dly file as the integration key, with its counts, on the audit trail', async () => {
    const url = `/v1/weather-stations/${celsius}/imports?format=ghcn-dly&station=${GHCN_ID}`;
    const response = await api.call('POST', url, {
      as: 'integration',
      csv: DLY,
      headers: { 'content-type': 'text/plain' },
    });
    expect(response.status, response.text).toBe(200);
    expect(response.json).toMatchObject({
      stationId: celsius,
      format: 'ghcn-dly',
      archiveStationId: GHCN_ID,
      counts: { daysRead: 29, imported: 27, droppedByFlag: 1, missing: 2, droppedFlags: { I: 1 }, otherElements: 1 },
      firstDate: '2024-02-01',
      lastDate: '2024-02-29',
      created: 27,
      updated: 0,
      unchanged: 0,
    });
    const listed = await api.call('GET', `/v1/weather-stations/${celsius}/observations?from=2024-02-01&to=2024-02-02`);
    // (−2.0 + 10.0)/2 = 4 °C, the common-practice mean of the day's extremes
    expect(listed.json.observations).toEqual([
      { date: '2024-02-01', temp: 4, tmin: -2, tmax: 10, filled: null, fillNote: null },
    ]);
    const trail = await api.call('GET', `/v1/audit?entity=weather-station&entityId=${celsius}`, { as: 'analyst' });
    const row = trail.json.entries.find((e: { action: string }) => e.action === 'import-observations');
    expect(row.after.import).toMatchObject({
      format: 'ghcn-dly',
      counts: { daysRead: 29, droppedByFlag: 1, missing: 2 },
    });
    // The same file again changes nothing and writes no audit row.
    const again = await api.call('POST', url, { csv: DLY, headers: { 'content-type': 'text/plain' } });
    expect(again.json).toMatchObject({ created: 0, updated: 0, unchanged: 27 });
  });

  it('imports GSOD CSV into a °F station', async () => {
    const fahrenheit = await station('F', 'Station south (invented)');
    const file = [GSOD_HEADER, gsodRow(GSOD_ID, '2024-03-01', '  50.5', '24', '  60.0', ' ', '  40.0', '*')].join('\n');
    const response = await api.call('POST', `/v1/weather-stations/${fahrenheit}/imports?format=gsod-csv`, {
      csv: file,
    });
    expect(response.status, response.text).toBe(200);
    const listed = await api.call('GET', `/v1/weather-stations/${fahrenheit}/observations`);
    expect(listed.json.observations[0]).toMatchObject({ date: '2024-03-01', temp: 50.5 });
  });

  it('refuses a faulty file naming line and column, a wrong station, a wrong format and an oversized body; stores nothing', async () => {
    const lines = DLY.split('\n');
    lines[1] = lines[1]!.slice(0, 150);
    const truncated = await refused('POST', `/v1/weather-stations/${celsius}/imports?format=ghcn-dly`, {
      csv: lines.join('\n'),
      headers: { 'content-type': 'text/plain' },
    });
    expect(truncated.status).toBe(400);
    expect(truncated.json.detail).toMatch(/^ghcn-dly file, line 2, column 151: truncated line/);
    expect(truncated.json.errors[0].field).toBe('line 2, column 151');

    const wrongStation = await refused(
      'POST',
      `/v1/weather-stations/${celsius}/imports?format=ghcn-dly&station=ZZX00000009`,
      {
        csv: DLY,
        headers: { 'content-type': 'text/plain' },
      },
    );
    expect(wrongStation.status).toBe(400);
    expect(wrongStation.json.detail).toMatch(/does not match the expected station ZZX00000009/);

    const wrongFormat = await refused('POST', `/v1/weather-stations/${celsius}/imports?format=gsod-csv`, {
      csv: DLY,
      headers: { 'content-type': 'text/plain' },
    });
    expect(wrongFormat.status).toBe(400);
    expect(wrongFormat.json.detail).toMatch(/header lacks/);

    const unknownFormat = await refused('POST', `/v1/weather-stations/${celsius}/imports?format=isd-lite`, {
      csv: DLY,
    });
    expect(unknownFormat.status).toBe(400);

    const huge = await refused('POST', `/v1/weather-stations/${celsius}/imports?format=ghcn-dly`, {
      csv: `${DLY}\n`.repeat(Math.ceil((50 * 1024 * 1024) / DLY.length)),
      headers: { 'content-type': 'text/plain' },
    });
    expect(huge.status).toBe(413);
  });

  it('may not change a day inside a frozen baseline’s window (409), and another organisation’s station is a 404', async () => {
    await frozenBaselineOn(celsius, 'bas_frozen_import', '2024-02-20', '2024-03-20');
    const response = await refused('POST', `/v1/weather-stations/${celsius}/imports?format=ghcn-dly`, {
      csv: DLY,
      headers: { 'content-type': 'text/plain' },
    });
    expect(response.status).toBe(409);
    expect(response.json.detail).toMatch(/line 1 \(2024-02-20\)/);
    const other = await refused('POST', `/v1/weather-stations/${celsius}/imports?format=ghcn-dly`, {
      as: 'other',
      csv: DLY,
    });
    expect(other.status).toBe(404);
  });
});

describe('POST /v1/weather-stations/{id}/gap-fills', () => {
  const put = (stationId: string, observations: { date: string; temp: number }[]) =>
    api.call('PUT', `/v1/weather-stations/${stationId}/observations`, { body: { observations } });

  it('interpolates short gaps, fills long ones from a second station, leaves the rest empty, and says so everywhere', async () => {
    // Invented: 40 days in January–February 2025 observed at both stations, with the second reading 2 °C colder, plus noise-free offset.
    const second = await station('C', 'Station east (invented)');
    const days = Array.from({ length: 40 }, (_, i) => ({
      date: new Date(Date.UTC(2025, 0, 1 + i)).toISOString().slice(0, 10),
      temp: 5 + (i % 7),
    }));
    await put(
      second,
      days.map((d) => ({ date: d.date, temp: d.temp - 2 })),
    );
    // The target lacks 11–12 January (2 days) and 20–24 January (5 days); the second station lacks 22 January.
    const gapDays = new Set([
      '2025-01-11',
      '2025-01-12',
      '2025-01-20',
      '2025-01-21',
      '2025-01-22',
      '2025-01-23',
      '2025-01-24',
    ]);
    await put(
      celsius,
      days.filter((d) => !gapDays.has(d.date)),
    );
    await api.call('PUT', `/v1/weather-stations/${second}/observations`, {
      body: { observations: [{ date: '2025-01-22', temp: 0 }] },
    });
    // (the second station's 22 January is replaced by an observed 0 °C: it stays usable)
    const response = await api.call('POST', `/v1/weather-stations/${celsius}/gap-fills`, {
      body: { from: '2025-01-01', to: '2025-02-10', secondStationId: second },
    });
    expect(response.status, response.text).toBe(200);
    const fill = response.json;
    expect(fill.gaps).toBe(2);
    expect(fill.filled).toEqual({ interpolation: 2, secondStation: 5 });
    expect(fill.leftEmpty).toEqual([]);
    // The line through an exact offset: t = 2 + 1·t₂, RMSE 0 (hand-worked: the target is the second station + 2 on 33 shared days).
    expect(fill.offset.intercept).toBeCloseTo(2, 9);
    expect(fill.offset.slope).toBeCloseTo(1, 9);
    expect(fill.offset.rmse).toBeCloseTo(0, 9);
    expect(fill.offset.overlapDays).toBe(33);
    // 10 January = 5 + 9 % 7 = 7, 13 January = 5 + 12 % 7 = 10: interpolated 8 and 9.
    expect(fill.days.slice(0, 2).map((d: { date: string; temp: number }) => [d.date, d.temp])).toEqual([
      ['2025-01-11', 8],
      ['2025-01-12', 9],
    ]);
    const listed = await api.call('GET', `/v1/weather-stations/${celsius}/observations?from=2025-01-22&to=2025-01-23`);
    expect(listed.json.observations[0]).toMatchObject({ date: '2025-01-22', filled: 'second-station' });
    expect(listed.json.observations[0].temp).toBeCloseTo(2, 9); // 2 + 1·0
    expect(listed.json.observations[0].fillNote).toMatch(/^station .*: t = 2 \+ 1·t₂ \(RMSE 0 over 33 days\), t₂ = 0$/);

    // A second run finds the filled days and leaves them alone; an observation replaces a fill.
    const again = await api.call('POST', `/v1/weather-stations/${celsius}/gap-fills`, {
      body: { from: '2025-01-01', to: '2025-02-10' },
    });
    expect(again.json).toMatchObject({
      filled: { interpolation: 0, secondStation: 0 },
      alreadyFilled: 7,
      leftEmpty: [],
    });
    await put(celsius, [{ date: '2025-01-11', temp: 8.5 }]);
    const observed = await api.call(
      'GET',
      `/v1/weather-stations/${celsius}/observations?from=2025-01-11&to=2025-01-12`,
    );
    expect(observed.json.observations[0]).toMatchObject({ temp: 8.5, filled: null, fillNote: null });
  });

  it('leaves long gaps empty without a second station, refuses fills inside a frozen window and out-of-range settings', async () => {
    await put(celsius, [
      { date: '2025-03-01', temp: 1 },
      { date: '2025-03-05', temp: 5 },
    ]);
    const empty = await api.call('POST', `/v1/weather-stations/${celsius}/gap-fills`, {
      body: { from: '2025-03-01', to: '2025-03-06' },
    });
    expect(empty.json.leftEmpty).toEqual(['2025-03-02', '2025-03-03', '2025-03-04']);
    // maxInterpolationDays 3 fills them: 1 + 4·k/4 = 2, 3, 4.
    await frozenBaselineOn(celsius, 'bas_frozen_fill', '2025-03-03', '2025-04-01');
    const frozen = await refused('POST', `/v1/weather-stations/${celsius}/gap-fills`, {
      body: { from: '2025-03-01', to: '2025-03-06', maxInterpolationDays: 3 },
    });
    expect(frozen.status).toBe(409);
    expect(frozen.json.detail).toMatch(/this fill would change 2025-03-03/);
    const atBound = await api.call('POST', `/v1/weather-stations/${celsius}/gap-fills`, {
      body: { from: '2025-03-01', to: '2025-03-03', maxInterpolationDays: 31 },
    });
    expect(atBound.status).toBe(200);
    expect(atBound.json.days.map((d: { temp: number }) => d.temp)).toEqual([2]);
    const beyond = await refused('POST', `/v1/weather-stations/${celsius}/gap-fills`, {
      body: { from: '2025-03-01', to: '2025-03-06', maxInterpolationDays: 32 },
    });
    expect(beyond.status).toBe(400);
    expect(beyond.json.detail).toMatch(/maxInterpolationDays/);
    const analyst = await refused('POST', `/v1/weather-stations/${celsius}/gap-fills`, {
      as: 'analyst',
      body: { from: '2025-03-01', to: '2025-03-06' },
    });
    expect(analyst.status).toBe(403);
  });
});

describe('normal year from history and the station record', () => {
  it('builds the normal year from two stored years and summarises the record', async () => {
    // Synthetic: 2023 and 2024 with the temperature equal to the day of the month (so every calendar day's mean is known).
    const observations: { date: string; temp: number }[] = [];
    for (let t = Date.UTC(2023, 0, 1); t < Date.UTC(2025, 0, 1); t += 86_400_000) {
      const date = new Date(t).toISOString().slice(0, 10);
      if (date !== '2024-06-15') observations.push({ date, temp: Number(date.slice(8)) });
    }
    await api.call('PUT', `/v1/weather-stations/${celsius}/observations`, { body: { observations } });
    const fromHistory = `/v1/weather-stations/${celsius}/normal-year/from-history`;
    // 15 June is on record in one of the two years only: refused until filled (80% of 2 years is 2).
    const short = await refused('POST', fromHistory, { body: { fromYear: 2023, toYear: 2024 } });
    expect(short.status).toBe(422);
    expect(short.json.detail).toMatch(/fewer than 2 of the 2 years 2023–2024 on record: 06-15/);
    const even = await refused('POST', fromHistory, { body: { fromYear: 2023, toYear: 2024, windowDays: 14 } });
    expect(even.status).toBe(400);
    await api.call('POST', `/v1/weather-stations/${celsius}/gap-fills`, {
      body: { from: '2024-06-01', to: '2024-07-01' },
    });
    const built = await api.call('POST', fromHistory, { body: { fromYear: 2023, toYear: 2024, windowDays: 1 } });
    expect(built.status, built.text).toBe(200);
    expect(built.json.days[0]).toEqual({ day: '01-01', temp: 1 });
    // 15 June: 15 in 2023, and (14 + 16)/2 = 15 interpolated in 2024.
    expect(built.json.days.find((d: { day: string }) => d.day === '06-15').temp).toBe(15);
    // 28 February: 28 in both years and 29 from 2024-02-29 folded in: (28 + 28 + 29)/3.
    expect(built.json.days.find((d: { day: string }) => d.day === '02-28').temp).toBeCloseTo(85 / 3, 5);
    expect(built.json.source).toMatch(
      /mean of each calendar day over 2 year\(s\) 2023–2024 \(731 days, 1 of them filled\), 29 February folded/,
    );

    const record = await api.call('GET', `/v1/weather-stations/${celsius}/record`, { as: 'analyst' });
    expect(record.status, record.text).toBe(200);
    expect(record.json).toMatchObject({
      first: '2023-01-01',
      last: '2024-12-31',
      spanDays: 731,
      observed: 730,
      filled: { interpolation: 1, secondStation: 0 },
      missing: 0,
      outsideBounds: 0,
    });
    expect(record.json.years).toEqual([
      { year: 2023, days: 365, observed: 365, filled: 0, missing: 0 },
      { year: 2024, days: 366, observed: 365, filled: 1, missing: 0 },
    ]);
    expect(record.json.min).toEqual({ date: '2023-01-01', temp: 1 });
  });
});
