/**
 * The migrations create the same schema on SQLite and PostgreSQL (this file
 * runs in both test projects) and are idempotent; the database itself refuses
 * a second frozen baseline for one meter. Check values: the schema as written
 * in migrations/ (the source of truth).
 */
import { Migrator, type Kysely } from 'kysely';
import { describe, expect, it } from 'vitest';
import { openStore } from '../../src/store/connect.js';
import { migrateToLatest } from '../../src/store/migrate.js';
import { migrations } from '../../migrations/index.js';
import { dropTestDatabase, freshTestDatabaseUrl } from '../support/database.js';
import { bareBaselineRow } from '../support/baseline-rows.js';

const TABLES = [
  'adjustments',
  'api_keys',
  'audit_checkpoints',
  'audit_log',
  'baselines',
  'contracts',
  'facilities',
  'facility_calendars',
  'frozen_models',
  'idempotency_keys',
  'meter_data_versions',
  'meters',
  'normal_years',
  'organisations',
  'rates',
  'readings',
  'statement_copies',
  'statements',
  'variable_values',
  'variables',
  'weather_observations',
  'weather_stations',
];

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
      await db
        .insertInto('organisations')
        .values({ id: 'org_m', name: 'Migration test org', created_at: at })
        .execute();
      await db
        .insertInto('weather_stations')
        .values({ id: 'wst_m', organisation_id: 'org_m', name: 'S', temperature_unit: 'F', created_at: at })
        .execute();
      await db
        .insertInto('facilities')
        .values({ id: 'fac_m', organisation_id: 'org_m', name: 'F', address: null, floor_area: null, created_at: at })
        .execute();
      await db
        .insertInto('meters')
        .values({
          id: 'mtr_m',
          organisation_id: 'org_m',
          facility_id: 'fac_m',
          name: 'M',
          fuel: 'electricity',
          unit: 'kWh',
          weather_station_id: 'wst_m',
          created_at: at,
        })
        .execute();
      const baseline = (id: string, version: number, status: 'frozen' | 'superseded') =>
        bareBaselineRow({
          id,
          organisationId: 'org_m',
          meterId: 'mtr_m',
          start: '2024-01-01',
          end: '2025-01-01',
          status,
          version,
          model: '1P',
          at,
        });
      await db
        .insertInto('baselines')
        .values(baseline('bsl_1', 1, 'superseded'))
        .execute();
      await db
        .insertInto('baselines')
        .values(baseline('bsl_2', 2, 'frozen'))
        .execute();
      await expect(
        db
          .insertInto('baselines')
          .values(baseline('bsl_3', 3, 'frozen'))
          .execute(),
      ).rejects.toThrow();
      const stored = await db
        .selectFrom('baselines')
        .select(['temperature_form', 'short_baseline_override', 'extrapolation_override'])
        .where('id', '=', 'bsl_1')
        .executeTakeFirstOrThrow();
      expect(stored).toEqual({ temperature_form: 'mean', short_baseline_override: null, extrapolation_override: null });
    } finally {
      await store.close();
      await dropTestDatabase(url);
    }
  });

  it('records the form of the baselines stored before it: mean, unless the fit document names the day-resolved form', async () => {
    const url = freshTestDatabaseUrl();
    const store = openStore(url);
    // eslint-disable-next-line @typescript-eslint/no-explicit-any
    const db = store.db as Kysely<any>;
    try {
      const names = Object.keys(migrations);
      const formMigration = '0004_baseline_form_and_overrides';
      for (const name of names.slice(0, names.indexOf(formMigration))) await migrations[name]!.up(db);
      const at = '2026-01-01T00:00:00.000Z';
      await db
        .insertInto('organisations')
        .values({ id: 'org_m', name: 'Migration test org', created_at: at })
        .execute();
      await db
        .insertInto('weather_stations')
        .values({ id: 'wst_m', organisation_id: 'org_m', name: 'S', temperature_unit: 'F', created_at: at })
        .execute();
      await db
        .insertInto('facilities')
        .values({ id: 'fac_m', organisation_id: 'org_m', name: 'F', address: null, floor_area: null, created_at: at })
        .execute();
      await db
        .insertInto('meters')
        .values({
          id: 'mtr_m',
          organisation_id: 'org_m',
          facility_id: 'fac_m',
          name: 'M',
          fuel: 'electricity',
          unit: 'kWh',
          weather_station_id: 'wst_m',
          created_at: at,
        })
        .execute();
      const oldRow = (id: string, version: number, documentJson: string) => {
        const {
          temperature_form: _f,
          short_baseline_override: _s,
          extrapolation_override: _e,
          ...row
        } = bareBaselineRow({
          id,
          organisationId: 'org_m',
          meterId: 'mtr_m',
          start: '2024-01-01',
          end: '2025-01-01',
          status: 'draft',
          version,
        });
        return { ...row, document_json: documentJson };
      };
      // Stored fit documents are canonical JSON: a pre-form fit names no form; one written by a build that knew it does.
      await db
        .insertInto('baselines')
        .values(oldRow('bsl_old', 1, '{"candidates":[],"selected":"3PH"}'))
        .execute();
      await db
        .insertInto('baselines')
        .values(
          oldRow(
            'bsl_day',
            2,
            '{"candidates":[],"selected":"3PH","settings":{"temperatureForm":"daily"},"temperatureForm":"daily"}',
          ),
        )
        .execute();
      await db
        .insertInto('adjustments')
        .values({
          id: 'adj_m',
          organisation_id: 'org_m',
          meter_id: 'mtr_m',
          period_start: '2025-01-01',
          period_end: '2025-02-01',
          quantity: 10,
          per_day: null,
          reason: 'test',
          created_at: at,
          created_by: 'test',
          withdrawn_at: null,
          withdrawn_by: null,
          withdraw_reason: null,
        })
        .execute();
      await migrations[formMigration]!.up(db);
      const forms = await db
        .selectFrom('baselines')
        .select(['id', 'temperature_form', 'short_baseline_override', 'extrapolation_override'])
        .orderBy('id')
        .execute();
      expect(forms).toEqual([
        { id: 'bsl_day', temperature_form: 'daily', short_baseline_override: null, extrapolation_override: null },
        { id: 'bsl_old', temperature_form: 'mean', short_baseline_override: null, extrapolation_override: null },
      ]);
      expect(await db.selectFrom('adjustments').select('uncertainty').executeTakeFirstOrThrow()).toEqual({
        uncertainty: null,
      });
    } finally {
      await store.close();
      await dropTestDatabase(url);
    }
  });

  it('runs a migration numbered below one already run (0009 arriving after 0010), instead of refusing to start', async () => {
    const url = freshTestDatabaseUrl();
    const store = openStore(url);
    try {
      // A database migrated by a build that had 0010 but not yet 0009 (the migrator's own bookkeeping, as migrate.ts names it).
      const without = Object.fromEntries(
        Object.entries(migrations).filter(([name]) => name !== '0009_idempotency_holder'),
      );
      const schema = url.startsWith('postgres') ? new URL(url).searchParams.get('schema') : null;
      const earlier = new Migrator({
        db: store.db,
        provider: { getMigrations: async () => without },
        migrationTableName: 'schema_migrations',
        migrationLockTableName: 'schema_migrations_lock',
        ...(schema ? { migrationTableSchema: schema } : {}),
      });
      expect((await earlier.migrateToLatest()).error).toBeUndefined();
      expect(await migrateToLatest(store.db)).toEqual(['0009_idempotency_holder']);
      const columns = (await store.db.introspection.getTables())
        .filter((t) => t.name === 'idempotency_keys' && (schema === null || t.schema === schema))
        .flatMap((t) => t.columns.map((c) => c.name));
      expect(columns).toContain('holder');
    } finally {
      await store.close();
      await dropTestDatabase(url);
    }
  });
});
