/**
 * GET /v1/reports/savings/stream over HTTP (SQLite and PostgreSQL): JSON and
 * CSV with the whole report's totals, 422 before any byte when the window
 * has no reporting data, HTML refused on this route, and the whole report's
 * HTML asked per facility above HTML_METER_LIMIT meters. Synthetic: a
 * seeded generated portfolio; the test sets the truth.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { generatePortfolio } from '../../src/demo/portfolio.js';
import { createKey } from '../../src/services/organisations.js';
import { HTML_METER_LIMIT } from '../../src/services/reports.js';
import { makeTestApi, type TestApi } from '../support/api.js';

let api: TestApi;
let token: string;

beforeAll(async () => {
  api = await makeTestApi();
  const { organisationId } = await generatePortfolio(api.store.db, {
    facilities: 3,
    metersPerFacility: 2,
    stations: 1,
    archetypesPerStation: 2,
    seed: 5,
  });
  token = (
    await createKey(api.store.db, { organisationId, name: 'analyst', role: 'analyst', at: '2026-01-20T00:00:00.000Z' })
  ).token;
}, 120_000);

afterAll(() => api.close());

describe('GET /v1/reports/savings/stream', () => {
  it('JSON: the whole report’s portfolio, facilities (without chart points) and notices', async () => {
    const whole = await api.call('GET', '/v1/reports/savings?quarter=2025-Q3', { as: { token } });
    const streamed = await api.call('GET', '/v1/reports/savings/stream?quarter=2025-Q3', { as: { token } });
    expect(whole.status).toBe(200);
    expect(streamed.status).toBe(200);
    expect(streamed.headers['content-type']).toBe('application/json; charset=utf-8');
    expect(streamed.json.streamed).toBe(true);
    expect(streamed.json.portfolio).toEqual(whole.json.portfolio);
    expect(streamed.json.portfolio.meters).toBe(6);
    expect(streamed.json.notices).toEqual(whole.json.notices);
    expect(streamed.json.facilities.map((f: { totals: unknown }) => f.totals)).toEqual(
      whole.json.facilities.map((f: { totals: unknown }) => f.totals),
    );
    expect(streamed.text.trimEnd()).toMatch(/"contentHash":"[0-9a-f]{64}"}$/);
  });

  it('CSV: one table ending with its digest row', async () => {
    const streamed = await api.call('GET', '/v1/reports/savings/stream?quarter=2025-Q3&format=csv', { as: { token } });
    expect(streamed.status).toBe(200);
    expect(streamed.headers['content-type']).toBe('text/csv; charset=utf-8');
    const lines = streamed.text.trimEnd().split('\r\n');
    expect(lines[0]!.startsWith('record,facility_id,facility,')).toBe(true);
    expect(lines.filter((l) => l.startsWith('meter,'))).toHaveLength(6);
    expect(lines[lines.length - 1]).toMatch(/^digest,.*content hash [0-9a-f]{64}/);
  });

  it('answers 422 with a problem before any byte when no meter has reporting readings in the window', async () => {
    const response = await api.call('GET', '/v1/reports/savings/stream?quarter=2031-Q1', { as: { token } });
    expect(response.status).toBe(422);
    expect(response.json.detail).toMatch(/no meter of this organisation has reporting data in 2031-Q1/);
  });

  it('refuses format=html (the HTML is per facility) and a bad window, naming the field', async () => {
    const html = await api.call('GET', '/v1/reports/savings/stream?quarter=2025-Q3&format=html', { as: { token } });
    expect(html.status).toBe(400);
    expect(html.text).toMatch(/format/);
    const both = await api.call('GET', '/v1/reports/savings/stream?quarter=2025-Q3&contractYear=1', { as: { token } });
    expect(both.status).toBe(400);
  });
});

describe('the whole report’s HTML above the meter limit', () => {
  it(`asks for facilityId when the organisation has more than ${HTML_METER_LIMIT} meters`, async () => {
    const db = api.store.db;
    const other = api.otherOrganisationId;
    await db
      .insertInto('weather_stations')
      .values({
        id: 'wst_many',
        organisation_id: other,
        name: 'Invented station',
        temperature_unit: 'F',
        created_at: '2026-01-01T00:00:00.000Z',
      })
      .execute();
    await db
      .insertInto('facilities')
      .values({
        id: 'fac_many',
        organisation_id: other,
        name: 'Invented campus',
        address: null,
        floor_area: null,
        created_at: '2026-01-01T00:00:00.000Z',
      })
      .execute();
    await db
      .insertInto('meters')
      .values(
        Array.from({ length: HTML_METER_LIMIT + 1 }, (_, k) => ({
          id: `mtr_many_${k}`,
          organisation_id: other,
          facility_id: 'fac_many',
          name: `Meter ${k}`,
          fuel: 'electricity',
          unit: 'kWh',
          weather_station_id: 'wst_many',
          created_at: '2026-01-01T00:00:00.000Z',
        })),
      )
      .execute();
    const whole = await api.call('GET', '/v1/reports/savings?quarter=2025-Q3&format=html', { as: 'other' });
    expect(whole.status).toBe(422);
    expect(whole.json.detail).toMatch(
      /has 201 meters; above 200 the HTML report is made per facility: give facilityId/,
    );
    const perFacility = await api.call('GET', '/v1/reports/savings?quarter=2025-Q3&format=html&facilityId=fac_many', {
      as: 'other',
    });
    // Past the size check: refused only because the facility's meters have no data.
    expect(perFacility.status).toBe(422);
    expect(perFacility.json.detail).toMatch(/no meter of facility fac_many has reporting data/);
  });
});
