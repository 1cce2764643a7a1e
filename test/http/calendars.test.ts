/**
 * Facility calendars over HTTP: replaced whole, bad ones refused naming the
 * field with nothing stored; a daily meter fitted with options.dayTypes
 * carries day-type intercepts as the engine does; a change to a day inside a
 * frozen window is refused; savings read the reporting days' types from the
 * calendar. Synthetic: the test sets the truth (an invented school whose use
 * falls by 700 kWh a day at weekends and 1,200 in breaks).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  addDays,
  analyseBaseline,
  dayTypeSeries,
  dayTypesOver,
  type FacilityCalendar,
} from '../../src/engine/index.js';
import { makeTestApi, type TestApi } from '../support/api.js';
import { databaseDigest } from '../support/db-digest.js';
import { seededRandom } from '../support/synthetic.js';

const CALENDAR: FacilityCalendar = {
  dayTypes: ['term', 'weekend', 'break'],
  weekly: ['term', 'term', 'term', 'term', 'term', 'weekend', 'weekend'],
  exceptions: [
    { start: '2032-07-01', end: '2032-09-01', dayType: 'break', note: 'summer break (invented)' },
    { start: '2032-12-20', end: '2033-01-04', dayType: 'break' },
    { start: '2033-02-14', end: '2033-02-19', dayType: 'break' },
  ],
};
const random = seededRandom(91);
const FROM = '2032-01-01';
const TYPES = dayTypesOver(CALENDAR, FROM, '2033-03-01');
const WEATHER = TYPES.map((_, d) => ({
  date: addDays(FROM, d),
  temp: 50 - 21 * Math.cos((2 * Math.PI * d) / 366) + random.normal() * 4,
}));
const READINGS = WEATHER.map((w, d) => ({
  start: w.date,
  end: addDays(w.date, 1),
  quantity:
    2600 +
    35 * Math.max(57 - w.temp, 0) -
    (TYPES[d] === 'weekend' ? 700 : TYPES[d] === 'break' ? 1200 : 0) +
    random.normal() * 90,
}));
const WINDOW = { start: FROM, end: '2033-01-01' };

let api: TestApi;
beforeAll(async () => {
  api = await makeTestApi();
});
afterAll(async () => {
  await api.close();
});

describe('facility calendars (PUT/GET /v1/facilities/{id}/calendar) and day types in fits', () => {
  it('stores a calendar, refuses a bad one, fits day-type intercepts, protects frozen days and feeds savings', async () => {
    const station = await api.call('POST', '/v1/weather-stations', {
      as: 'engineer',
      body: { name: 'Invented vale station', temperatureUnit: 'F' },
    });
    await api.call('PUT', `/v1/weather-stations/${station.json.id}/observations`, {
      as: 'integration',
      body: { observations: WEATHER },
    });
    const facility = await api.call('POST', '/v1/facilities', {
      as: 'engineer',
      body: { name: 'Lower school (invented)' },
    });
    const facilityId = facility.json.id;
    const meter = await api.call('POST', `/v1/facilities/${facilityId}/meters`, {
      as: 'engineer',
      body: {
        name: 'School electricity (invented)',
        fuel: 'electricity',
        unit: 'kWh',
        weatherStationId: station.json.id,
      },
    });
    expect(
      (
        await api.call('POST', `/v1/meters/${meter.json.id}/readings`, {
          as: 'integration',
          body: { readings: READINGS },
        })
      ).status,
    ).toBe(201);

    const noCalendar = await api.call('POST', `/v1/meters/${meter.json.id}/baselines`, {
      as: 'engineer',
      body: { ...WINDOW, options: { dayTypes: true } },
    });
    expect(noCalendar.status).toBe(422);
    expect(noCalendar.json.detail).toMatch(/^options\.dayTypes: facility \S+ has no calendar/);

    const before = await databaseDigest(api.store.db);
    const overlapping = await api.call('PUT', `/v1/facilities/${facilityId}/calendar`, {
      as: 'engineer',
      body: {
        ...CALENDAR,
        exceptions: [...CALENDAR.exceptions, { start: '2032-08-30', end: '2032-09-03', dayType: 'term' }],
      },
    });
    expect(overlapping.status).toBe(400);
    expect(overlapping.json.detail).toBe(
      'exceptions[3]: 2032-08-30..2032-09-03 overlaps exceptions[0] 2032-07-01..2032-09-01',
    );
    expect(await databaseDigest(api.store.db)).toBe(before);

    const put = await api.call('PUT', `/v1/facilities/${facilityId}/calendar`, { as: 'engineer', body: CALENDAR });
    expect(put.status).toBe(200);
    expect((await api.call('GET', `/v1/facilities/${facilityId}/calendar`, { as: 'analyst' })).json).toMatchObject(
      CALENDAR,
    );

    const fit = await api.call('POST', `/v1/meters/${meter.json.id}/baselines`, {
      as: 'engineer',
      body: { ...WINDOW, options: { dayTypes: true } },
    });
    expect(fit.status).toBe(201);
    expect(fit.json.fit.variables).toEqual(['day type: weekend', 'day type: break']);
    const series = dayTypeSeries(CALENDAR, WINDOW.start, WINDOW.end);
    const engine = analyseBaseline(READINGS.slice(0, 366), WEATHER, {
      variableSeries: series,
      variables: series.map((s) => s.name),
    });
    const selected = fit.json.fit.candidates.find((c: { model: string }) => c.model === fit.json.selected);
    expect(selected.sse).toBeCloseTo(
      engine.document.candidates.find((c) => c.model === engine.choice.selected)!.sse!,
      4,
    ); // the engine itself
    const weekend = selected.coefficients.find((c: { name: string }) => c.name === 'day type: weekend');
    expect(Math.abs(weekend.estimate + 700)).toBeLessThan(3 * weekend.standardError); // truth −700, set above

    expect(
      (
        await api.call('POST', `/v1/baselines/${fit.json.id}/freeze`, {
          as: 'engineer',
          body: { note: 'M&V plan (invented)' },
        })
      ).status,
    ).toBe(200);
    const moved = await api.call('PUT', `/v1/facilities/${facilityId}/calendar`, {
      as: 'engineer',
      body: { ...CALENDAR, exceptions: CALENDAR.exceptions.slice(1) },
    });
    expect(moved.status).toBe(409);
    expect(moved.json.detail).toMatch(
      /would change the day type of 2032-07-01 \(break → term\) inside the window 2032-01-01\.\.2033-01-01/,
    );
    // A change after the frozen window is fine.
    const later = await api.call('PUT', `/v1/facilities/${facilityId}/calendar`, {
      as: 'engineer',
      body: {
        ...CALENDAR,
        exceptions: [...CALENDAR.exceptions, { start: '2033-04-10', end: '2033-04-15', dayType: 'break' }],
      },
    });
    expect(later.status).toBe(200);

    const savings = await api.call('GET', `/v1/meters/${meter.json.id}/savings`, { as: 'analyst' });
    expect(savings.status).toBe(200);
    expect(savings.json.periods).toHaveLength(59);
    // No retrofit: the saving is noise, within a few of its standard errors (the truth the test set).
    expect(Math.abs(savings.json.totals.savings)).toBeLessThan(3 * savings.json.totals.uncertainty.exact.absolute);
  });

  it('takes the exceptions as a CSV file, day types and week from the query or kept from the stored calendar', async () => {
    const facility = await api.call('POST', '/v1/facilities', {
      as: 'engineer',
      body: { name: 'Upper school (invented)' },
    });
    const facilityId = facility.json.id;
    const url = `/v1/facilities/${facilityId}/calendar`;
    const file = (rows: string[]) => ['start,end,dayType,note', ...rows].join('\n') + '\n';
    const terms2032 = file(['2032-07-01,2032-09-01,break,summer break (invented)', '2032-12-20,2033-01-04,break,']);
    const before = await databaseDigest(api.store.db);
    // No calendar yet and no day types in the query: refused naming the query field.
    const bare = await api.call('PUT', url, { as: 'engineer', csv: terms2032 });
    expect(bare.status).toBe(400);
    expect(bare.json.errors[0].field).toBe('query.dayTypes');
    // Overlapping rows: refused naming the CSV row (header is row 1); an unknown day type likewise.
    const week = 'weekly=term,term,term,term,term,weekend,weekend';
    const overlapping = await api.call('PUT', `${url}?dayTypes=term,weekend,break&${week}`, {
      as: 'engineer',
      csv: file(['2032-07-01,2032-09-01,break,', '2032-08-30,2032-09-03,term,']),
    });
    expect(overlapping.status).toBe(400);
    expect(overlapping.json.detail).toMatch(/^row 3: 2032-08-30\.\.2032-09-03 overlaps/);
    const unknown = await api.call('PUT', `${url}?dayTypes=term,weekend,break&${week}`, {
      as: 'engineer',
      csv: file(['2032-07-01,2032-09-01,holidays,']),
    });
    expect(unknown.status).toBe(400);
    expect(unknown.json.errors[0].field).toBe('row 2, field dayType');
    expect(await databaseDigest(api.store.db)).toBe(before);

    const first = await api.call('PUT', `${url}?dayTypes=term,weekend,break&${week}`, {
      as: 'engineer',
      csv: terms2032,
    });
    expect(first.status).toBe(200);
    expect(first.json).toMatchObject({
      dayTypes: ['term', 'weekend', 'break'],
      weekly: ['term', 'term', 'term', 'term', 'term', 'weekend', 'weekend'],
      exceptions: [
        { start: '2032-07-01', end: '2032-09-01', dayType: 'break', note: 'summer break (invented)' },
        { start: '2032-12-20', end: '2033-01-04', dayType: 'break' },
      ],
    });
    // Next year's term dates: one file, the day types and week kept from the stored calendar.
    const next = await api.call('PUT', url, {
      as: 'engineer',
      csv: file(['2032-07-01,2032-09-01,break,', '2033-07-01,2033-09-02,break,summer break 2033 (invented)']),
    });
    expect(next.status).toBe(200);
    expect(next.json.dayTypes).toEqual(['term', 'weekend', 'break']);
    expect(next.json.weekly[5]).toBe('weekend');
    expect(next.json.exceptions.map((e: { start: string }) => e.start)).toEqual(['2032-07-01', '2033-07-01']);
  });
});
