/**
 * The migrations create the same schema on SQLite and PostgreSQL (this file
 * runs in both test projects) and are idempotent; the database itself refuses
 * a second frozen baseline for one meter. Check values: the schema as written
 * in migrations/ (the source of truth).
 */
import { describe, expect, it } from 'vitest';
import { openStore } from '../../src/store/connect.js';
import { migrateToLatest } from '../../src/store/migrate.js';
import { migrations } from '../../migrations/index.js';
import { dropTestDatabase, freshTestDatabaseUrl } from '../support/database.js';
import { bareBaselineRow } from '../support/baseline-rows.js';

const TABLES = ['adjustments', 'api_keys', 'audit_log', 'baselines', 'contracts', 'facilities', 'idempotency_keys', 'meters', 'normal_years', 'organisations', 'rates', 'readings', 'weather_observations', 'weather_stations'];

describe('migrations', () => {
  it('create every table, run once, and refuse a second frozen baseline per meter', async () => {
    const url = freshTestDatabaseUrl();
    const store = openStore(url);
    try {
      expect(await migrateToLatest(store.db)).toEqual(Object.keys(migrations));
      expect(await migrateToLatest(store.db)).toEqual([]); // a second start changes nothing
      // Introspection lists every schema of a PostgreSQL database: keep this test's own.
      const schema = url.startsWith('postgres') ? new URL(url).searchParams.get('schema') : null;
      const tables = (await store.db.introspection.getTables())
        .filter((t) => schema === null || t.schema === schema)
        .map((t) => t.name)
        .filter((name) => TABLES.includes(name));
      expect(tables.sort()).toEqual(TABLES);

      const db = store.db;
      const at = '2026-01-01T00:00:00.000Z';
      await db.insertInto('organisations').values({ id: 'org_m', name: 'Migration test org', created_at: at }).execute();
      await db.insertInto('weather_stations').values({ id: 'wst_m', organisation_id: 'org_m', name: 'S', temperature_unit: 'F', created_at: at }).execute();
      await db.insertInto('facilities').values({ id: 'fac_m', organisation_id: 'org_m', name: 'F', address: null, floor_area: null, created_at: at }).execute();
      await db
        .insertInto('meters')
        .values({ id: 'mtr_m', organisation_id: 'org_m', facility_id: 'fac_m', name: 'M', fuel: 'electricity', unit: 'kWh', weather_station_id: 'wst_m', created_at: at })
        .execute();
      const baseline = (id: string, version: number, status: 'frozen' | 'superseded') =>
        bareBaselineRow({ id, organisationId: 'org_m', meterId: 'mtr_m', start: '2024-01-01', end: '2025-01-01', status, version, model: '1P', at });
      await db.insertInto('baselines').values(baseline('bsl_1', 1, 'superseded')).execute();
      await db.insertInto('baselines').values(baseline('bsl_2', 2, 'frozen')).execute();
      await expect(db.insertInto('baselines').values(baseline('bsl_3', 3, 'frozen')).execute()).rejects.toThrow();
    } finally {
      await store.close();
      await dropTestDatabase(url);
    }
  });
});
