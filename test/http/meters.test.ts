/**
 * Meters of a facility. Check values: the API contract (status codes, field
 * names, the fuel list) and synthetic inputs whose truth the test sets.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApi, type TestApi } from '../support/api.js';
import { databaseDigest } from '../support/db-digest.js';

let api: TestApi;
let facilityId: string;
let stationId: string;

beforeAll(async () => {
  api = await makeTestApi();
  facilityId = (await api.call('POST', '/v1/facilities', { body: { name: 'Meadowlark Library (invented)' } })).json.id;
  stationId = (
    await api.call('POST', '/v1/weather-stations', { body: { name: 'Invented Field Station', temperatureUnit: 'F' } })
  ).json.id;
});
afterAll(async () => api.close());

const meterBody = (overrides: Record<string, unknown> = {}) => ({
  name: 'Main electric',
  fuel: 'electricity',
  unit: 'kWh',
  weatherStationId: stationId,
  ...overrides,
});

describe('meters', () => {
  it('adds a meter to a facility and reads it back', async () => {
    const created = await api.call('POST', `/v1/facilities/${facilityId}/meters`, {
      as: 'engineer',
      body: meterBody(),
    });
    expect(created.status).toBe(201); // contract
    expect(created.json).toMatchObject({
      facilityId,
      name: 'Main electric',
      fuel: 'electricity',
      unit: 'kWh',
      weatherStationId: stationId,
    });
    expect(created.json.id).toMatch(/^mtr_/);

    const one = await api.call('GET', `/v1/meters/${created.json.id}`, { as: 'analyst' });
    expect(one.status).toBe(200);
    expect(one.json).toEqual(created.json);
    const list = await api.call('GET', `/v1/facilities/${facilityId}/meters`, { as: 'analyst' });
    expect(list.status).toBe(200);
    expect(list.json.meters).toContainEqual(created.json);
  });

  it('takes every fuel of the list', async () => {
    // contract: the fuel enum of the issue
    for (const fuel of [
      'electricity',
      'natural-gas',
      'fuel-oil',
      'propane',
      'district-heat',
      'district-cooling',
      'water',
      'other',
    ]) {
      const response = await api.call('POST', `/v1/facilities/${facilityId}/meters`, {
        body: meterBody({ name: `${fuel} meter`, fuel, unit: 'GJ' }),
      });
      expect(response.status, fuel).toBe(201);
    }
  });

  it('audits the create with the meter as its after', async () => {
    const created = await api.call('POST', `/v1/facilities/${facilityId}/meters`, {
      body: meterBody({ name: 'Gas', fuel: 'natural-gas', unit: 'therm' }),
    });
    const audit = await api.call('GET', `/v1/audit?entity=meter&entityId=${created.json.id}`);
    expect(audit.json.entries).toHaveLength(1); // contract: one audit row per write
    expect(audit.json.entries[0]).toMatchObject({ action: 'create', after: created.json });
  });

  const invalid: { why: string; body: () => unknown; field: string }[] = [
    { why: 'an unknown fuel', body: () => meterBody({ fuel: 'coal-gas' }), field: 'fuel' },
    { why: 'an empty unit', body: () => meterBody({ unit: ' ' }), field: 'unit' },
    { why: 'no unit', body: () => ({ name: 'M', fuel: 'water', weatherStationId: stationId }), field: 'unit' },
    { why: 'no weather station', body: () => ({ name: 'M', fuel: 'water', unit: 'm3' }), field: 'weatherStationId' },
    {
      why: 'an unknown weather station',
      body: () => meterBody({ weatherStationId: 'wst_missing' }),
      field: 'weatherStationId',
    },
  ];
  for (const c of invalid) {
    it(`refuses ${c.why} with 400 naming the field, and stores nothing`, async () => {
      const before = await databaseDigest(api.store.db);
      const response = await api.call('POST', `/v1/facilities/${facilityId}/meters`, { body: c.body() });
      expect(response.status).toBe(400); // contract: validation problem
      expect(response.json.errors.map((e: { field: string }) => e.field)).toContain(c.field);
      expect(response.json.detail).toContain(c.field);
      expect(await databaseDigest(api.store.db)).toBe(before);
    });
  }

  it("refuses another organisation's weather station and answers 404 for its facility and meters", async () => {
    const theirStation = (
      await api.call('POST', '/v1/weather-stations', {
        as: 'other',
        body: { name: 'Their Station', temperatureUnit: 'C' },
      })
    ).json.id;
    const theirFacility = (await api.call('POST', '/v1/facilities', { as: 'other', body: { name: 'Their Site' } })).json
      .id;
    const theirMeter = await api.call('POST', `/v1/facilities/${theirFacility}/meters`, {
      as: 'other',
      body: meterBody({ weatherStationId: theirStation }),
    });
    expect(theirMeter.status).toBe(201);

    const before = await databaseDigest(api.store.db);
    expect(
      (
        await api.call('POST', `/v1/facilities/${facilityId}/meters`, {
          body: meterBody({ weatherStationId: theirStation }),
        })
      ).status,
    ).toBe(400);
    expect((await api.call('POST', `/v1/facilities/${theirFacility}/meters`, { body: meterBody() })).status).toBe(404); // contract: other organisation's ids are 404
    expect(await databaseDigest(api.store.db)).toBe(before);
    expect((await api.call('GET', `/v1/facilities/${theirFacility}/meters`)).status).toBe(404);
    expect((await api.call('GET', `/v1/meters/${theirMeter.json.id}`)).status).toBe(404);
    expect((await api.call('GET', '/v1/meters/mtr_missing')).status).toBe(404);
  });

  it('is refused to roles without the permission', async () => {
    expect(
      (await api.call('POST', `/v1/facilities/${facilityId}/meters`, { as: 'analyst', body: meterBody() })).status,
    ).toBe(403); // analyst lacks ledger
    expect((await api.call('GET', `/v1/facilities/${facilityId}/meters`, { as: 'integration' })).status).toBe(403); // integration lacks read
  });
});
