/**
 * POST /v1/weather-stations/{id}/normal-year/from-published-normals: a NOAA
 * daily normals CSV file constructed to the published layout (invented
 * station and values, ../station-archives/fixtures.ts) stored as the
 * station's normal year, all or nothing, on the audit trail. Check values:
 * synthetic (the fixture sets each day), °F → °C by NIST SP 811.
 */
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { makeTestApi, type TestApi } from '../support/api.js';
import { databaseDigest } from '../support/db-digest.js';
import { verifyAllAuditChains } from '../../src/store/audit.js';
import {
  NORMALS_ID,
  normalsAccessCsv,
  normalsArchiveCsv,
  normalsDays,
  normalsValues,
} from '../station-archives/fixtures.js';

let api: TestApi;

async function station(unit: 'F' | 'C', name: string): Promise<string> {
  return (await api.call('POST', '/v1/weather-stations', { body: { name, temperatureUnit: unit } })).json.id;
}

const path = (id: string, query = 'format=noaa-daily-normals-csv') =>
  `/v1/weather-stations/${id}/normal-year/from-published-normals?${query}`;
const asText = (text: string) => ({ body: text, headers: { 'content-type': 'text/plain' } });

beforeEach(async () => {
  api = await makeTestApi();
});

afterEach(async () => {
  expect((await verifyAllAuditChains(api.store.db)).ok).toBe(true);
  await api.close();
});

describe('POST /v1/weather-stations/{id}/normal-year/from-published-normals', () => {
  it('stores the 365 days of the file with a source that names the station, on the audit trail', async () => {
    const id = await station('F', 'Valley station (invented)');
    const stored = await api.call('POST', path(id), asText(normalsAccessCsv()));
    expect(stored.status).toBe(200);
    expect(stored.json.days).toHaveLength(365);
    expect(stored.json.days[59]).toEqual({
      day: '03-01',
      temp: Number(normalsValues(normalsDays().indexOf('03-01')).tavg),
    }); // synthetic
    expect(stored.json.source).toBe(
      `published daily normals (noaa-daily-normals-csv) of station ${NORMALS_ID}: DLY-TAVG-NORMAL on every day; 02-29 left out; in °F`,
    );
    expect((await api.call('GET', `/v1/weather-stations/${id}/normal-year`)).json).toEqual(stored.json);
    const audit = await api.store.db
      .selectFrom('audit_log')
      .select(['action', 'after_json'])
      .where('entity_id', '=', id)
      .where('action', '=', 'put-normal-year')
      .execute();
    expect(audit).toHaveLength(1);
    expect(JSON.parse(audit[0]!.after_json!).contentHash).toBe(stored.json.contentHash);
  });

  it('converts to a °C station, takes (TMAX + TMIN)/2 for a missing TAVG, and reads the archive form sent as text/csv', async () => {
    const id = await station('C', 'North station (invented)');
    const file = normalsArchiveCsv({
      change: (day, cells) => {
        if (day === '01-01')
          Object.assign(cells, { 'DLY-TAVG-NORMAL': '-9999.0', 'DLY-TMAX-NORMAL': '55.0', 'DLY-TMIN-NORMAL': '45.0' });
      },
    });
    const stored = await api.call('POST', path(id, `format=noaa-daily-normals-csv&station=${NORMALS_ID}`), {
      body: file,
      headers: { 'content-type': 'text/csv' },
    });
    expect(stored.status).toBe(200);
    expect(stored.json.days[0]).toEqual({ day: '01-01', temp: 10 }); // (55 + 45)/2 = 50 °F = 10 °C (NIST SP 811)
    expect(stored.json.source).toMatch(
      /DLY-TAVG-NORMAL on 364 days, \(DLY-TMAX-NORMAL \+ DLY-TMIN-NORMAL\)\/2 on 1 where it was missing; .*°F converted to °C$/,
    );
  });

  it('refuses a faulty file naming its line and column, and stores nothing', async () => {
    const id = await station('F', 'South station (invented)');
    const before = await databaseDigest(api.store.db);
    const bad = normalsAccessCsv({ change: (day, cells) => day === '04-02' && (cells['DLY-TAVG-NORMAL'] = 'n/a') });
    const answer = await api.call('POST', path(id), asText(bad));
    expect(answer.status).toBe(400);
    const line = normalsDays().indexOf('04-02') + 2;
    expect(answer.json.detail).toBe(
      `noaa-daily-normals-csv file, line ${line}, column 8 (DLY-TAVG-NORMAL): must be a number, got "n/a"`,
    );
    expect(answer.json.errors).toEqual([
      { field: `line ${line}, column 8 (DLY-TAVG-NORMAL)`, message: 'must be a number, got "n/a"' },
    ]);
    const otherStation = await api.call(
      'POST',
      path(id, 'format=noaa-daily-normals-csv&station=ZZC00000001'),
      asText(normalsAccessCsv()),
    );
    expect(otherStation.status).toBe(400);
    expect(otherStation.json.detail).toMatch(
      /column 1 \(STATION\): station id ZZC00054321 does not match the expected station ZZC00000001$/,
    );
    const unknownFormat = await api.call('POST', path(id, 'format=normals-xml'), asText(normalsAccessCsv()));
    expect(unknownFormat.status).toBe(400);
    expect(await databaseDigest(api.store.db)).toBe(before);
  });

  it('refuses a normal year outside the plausible range of the station’s unit, storing nothing', async () => {
    const id = await station('C', 'Hot station (invented)');
    const before = await databaseDigest(api.store.db);
    // A value no climate has (synthetic): 9000 °F is far outside the plausible range once converted to °C.
    const hot = normalsAccessCsv({ change: (day, cells) => day === '07-01' && (cells['DLY-TAVG-NORMAL'] = '9000.0') });
    const answer = await api.call('POST', path(id), asText(hot));
    expect(answer.status).toBe(400);
    expect(answer.json.errors[0].field).toBe('day 07-01');
    expect(await databaseDigest(api.store.db)).toBe(before);
  });

  it('is refused to a key without the ledger permission', async () => {
    const id = await station('F', 'Quiet station (invented)');
    expect((await api.call('POST', path(id), { ...asText(normalsAccessCsv()), as: 'analyst' })).status).toBe(403); // analyst lacks ledger
  });
});
