/**
 * Restarting the service on the same database (SQLite file or PostgreSQL schema) keeps everything: the
 * ledger, the frozen baseline with its hash, the keys, the audit chain and
 * the savings (byte for byte). Synthetic data: the test sets the truth.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { buildApp } from '../../src/http/app.js';
import { openStore } from '../../src/store/connect.js';
import { migrateToLatest } from '../../src/store/migrate.js';
import { makeTestApi, steppingClock } from '../support/api.js';
import { databaseDigest } from '../support/db-digest.js';
import { dropTestDatabase, freshTestDatabaseUrl, testDialect } from '../support/database.js';
import { CLIMATES, SAMPLE_BUILDING, dailyWeather, monthlyReadings, seededRandom } from '../support/synthetic.js';

const folder = mkdtempSync(join(tmpdir(), 'mvledger-restart-'));
// The same file (SQLite) or the same schema (PostgreSQL) is opened twice.
const databaseUrl = testDialect() === 'postgres' ? freshTestDatabaseUrl() : `sqlite:${join(folder, 'ledger.sqlite')}`;
afterAll(async () => {
  rmSync(folder, { recursive: true, force: true });
  await dropTestDatabase(databaseUrl);
});

describe('restart on the same database file', () => {
  it('keeps every row, the keys, the audit chain and the savings', async () => {
    const random = seededRandom(5);
    const weather = dailyWeather(CLIMATES.temperate, '2023-01-01', 1096, random);
    const readings = [
      ...monthlyReadings(SAMPLE_BUILDING, weather, '2023-01-01', 24, random),
      ...monthlyReadings({ ...SAMPLE_BUILDING, base: 260 }, weather, '2025-01-01', 12, random),
    ];

    const first = await makeTestApi({ databaseUrl });
    const station = await first.call('POST', '/v1/weather-stations', {
      body: { name: 'Invented hill station', temperatureUnit: 'F' },
    });
    await first.call('PUT', `/v1/weather-stations/${station.json.id}/observations`, {
      body: { observations: weather },
    });
    const facility = await first.call('POST', '/v1/facilities', { body: { name: 'Invented works hall' } });
    const meter = await first.call('POST', `/v1/facilities/${facility.json.id}/meters`, {
      body: { name: 'Hall electricity', fuel: 'electricity', unit: 'kWh', weatherStationId: station.json.id },
    });
    await first.call('POST', `/v1/meters/${meter.json.id}/readings`, { body: { readings } });
    const draft = await first.call('POST', `/v1/meters/${meter.json.id}/baselines`, {
      body: { start: '2023-01-01', end: '2025-01-01' },
    });
    const frozen = await first.call('POST', `/v1/baselines/${draft.json.id}/freeze`, { body: { note: 'agreed' } });
    expect(frozen.status).toBe(200);
    const savingsBefore = await first.call('GET', `/v1/meters/${meter.json.id}/savings?confidence=0.9`, {
      as: 'analyst',
    });
    expect(savingsBefore.status).toBe(200);
    const digestBefore = await databaseDigest(first.store.db);
    const analystKey = first.keys.analyst;
    await first.close();

    // A new process would do exactly this: open the file, migrate (a no-op now), build the app.
    const store = openStore(databaseUrl);
    expect(await migrateToLatest(store.db)).toEqual([]);
    expect(await databaseDigest(store.db)).toBe(digestBefore);
    const app = await buildApp({ store, now: steppingClock(Date.parse('2026-06-01T00:00:00Z')) });
    const get = (url: string) => app.inject({ method: 'GET', url, headers: { authorization: `Bearer ${analystKey}` } });
    try {
      const savingsAfter = await get(`/v1/meters/${meter.json.id}/savings?confidence=0.9`);
      expect(savingsAfter.statusCode).toBe(200);
      expect(savingsAfter.body).toBe(savingsBefore.text);
      const baseline = JSON.parse((await get(`/v1/baselines/${draft.json.id}`)).body);
      expect(baseline.status).toBe('frozen');
      expect(baseline.contentHash).toBe(frozen.json.contentHash);
      expect(baseline.verified).toBe(true);
      const verify = JSON.parse((await get('/v1/audit/verify')).body);
      expect(verify.ok).toBe(true);
      const readingsAfter = JSON.parse((await get(`/v1/meters/${meter.json.id}/readings`)).body);
      expect(readingsAfter.readings).toHaveLength(36);
    } finally {
      await app.close();
      await store.close();
    }
  });
});
