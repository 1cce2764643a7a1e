/**
 * The ledger's first schema. Dialect-neutral schema-builder code only, so the
 * same migration creates the same tables on SQLite and PostgreSQL.
 */
import type { Kysely } from 'kysely';

export async function up(db: Kysely<unknown>): Promise<void> {
  await db.schema
    .createTable('organisations')
    .addColumn('id', 'text', (c) => c.primaryKey())
    .addColumn('name', 'text', (c) => c.notNull())
    .addColumn('created_at', 'text', (c) => c.notNull())
    .execute();

  await db.schema
    .createTable('api_keys')
    .addColumn('id', 'text', (c) => c.primaryKey())
    .addColumn('organisation_id', 'text', (c) => c.notNull().references('organisations.id'))
    .addColumn('name', 'text', (c) => c.notNull())
    .addColumn('role', 'text', (c) => c.notNull())
    .addColumn('secret_hash', 'text', (c) => c.notNull())
    .addColumn('created_at', 'text', (c) => c.notNull())
    .addColumn('revoked_at', 'text')
    .execute();

  await db.schema
    .createTable('weather_stations')
    .addColumn('id', 'text', (c) => c.primaryKey())
    .addColumn('organisation_id', 'text', (c) => c.notNull().references('organisations.id'))
    .addColumn('name', 'text', (c) => c.notNull())
    .addColumn('temperature_unit', 'text', (c) => c.notNull())
    .addColumn('created_at', 'text', (c) => c.notNull())
    .execute();

  await db.schema
    .createTable('weather_observations')
    .addColumn('station_id', 'text', (c) => c.notNull().references('weather_stations.id'))
    .addColumn('date', 'text', (c) => c.notNull())
    .addColumn('temp', 'double precision', (c) => c.notNull())
    .addColumn('tmin', 'double precision')
    .addColumn('tmax', 'double precision')
    .addColumn('updated_at', 'text', (c) => c.notNull())
    .addPrimaryKeyConstraint('weather_observations_pk', ['station_id', 'date'])
    .execute();

  await db.schema
    .createTable('facilities')
    .addColumn('id', 'text', (c) => c.primaryKey())
    .addColumn('organisation_id', 'text', (c) => c.notNull().references('organisations.id'))
    .addColumn('name', 'text', (c) => c.notNull())
    .addColumn('address', 'text')
    .addColumn('floor_area', 'double precision')
    .addColumn('created_at', 'text', (c) => c.notNull())
    .execute();

  await db.schema
    .createTable('meters')
    .addColumn('id', 'text', (c) => c.primaryKey())
    .addColumn('organisation_id', 'text', (c) => c.notNull().references('organisations.id'))
    .addColumn('facility_id', 'text', (c) => c.notNull().references('facilities.id'))
    .addColumn('name', 'text', (c) => c.notNull())
    .addColumn('fuel', 'text', (c) => c.notNull())
    .addColumn('unit', 'text', (c) => c.notNull())
    .addColumn('weather_station_id', 'text', (c) => c.notNull().references('weather_stations.id'))
    .addColumn('created_at', 'text', (c) => c.notNull())
    .execute();

  await db.schema
    .createTable('readings')
    .addColumn('meter_id', 'text', (c) => c.notNull().references('meters.id'))
    .addColumn('period_start', 'text', (c) => c.notNull())
    .addColumn('period_end', 'text', (c) => c.notNull())
    .addColumn('quantity', 'double precision', (c) => c.notNull())
    .addColumn('estimated', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('cost', 'double precision')
    .addColumn('created_at', 'text', (c) => c.notNull())
    .addColumn('updated_at', 'text', (c) => c.notNull())
    .addPrimaryKeyConstraint('readings_pk', ['meter_id', 'period_start', 'period_end'])
    .execute();

  await db.schema
    .createTable('baselines')
    .addColumn('id', 'text', (c) => c.primaryKey())
    .addColumn('organisation_id', 'text', (c) => c.notNull().references('organisations.id'))
    .addColumn('meter_id', 'text', (c) => c.notNull().references('meters.id'))
    .addColumn('version', 'integer', (c) => c.notNull())
    .addColumn('period_start', 'text', (c) => c.notNull())
    .addColumn('period_end', 'text', (c) => c.notNull())
    .addColumn('status', 'text', (c) => c.notNull())
    .addColumn('options_json', 'text', (c) => c.notNull())
    .addColumn('document_json', 'text', (c) => c.notNull())
    .addColumn('fits_json', 'text', (c) => c.notNull())
    .addColumn('inputs_json', 'text', (c) => c.notNull())
    .addColumn('selected_model', 'text', (c) => c.notNull())
    .addColumn('chosen_model', 'text', (c) => c.notNull())
    .addColumn('choice_reason', 'text')
    .addColumn('content_hash', 'text')
    .addColumn('note', 'text')
    .addColumn('frozen_at', 'text')
    .addColumn('frozen_by', 'text')
    .addColumn('supersedes_id', 'text', (c) => c.references('baselines.id'))
    .addColumn('supersede_reason', 'text')
    .addColumn('created_at', 'text', (c) => c.notNull())
    .addColumn('created_by', 'text', (c) => c.notNull())
    .addUniqueConstraint('baselines_meter_version', ['meter_id', 'version'])
    .execute();

  await db.schema
    .createTable('audit_log')
    .addColumn('organisation_id', 'text', (c) => c.notNull())
    .addColumn('seq', 'integer', (c) => c.notNull())
    .addColumn('actor', 'text', (c) => c.notNull())
    .addColumn('at', 'text', (c) => c.notNull())
    .addColumn('action', 'text', (c) => c.notNull())
    .addColumn('entity_type', 'text', (c) => c.notNull())
    .addColumn('entity_id', 'text', (c) => c.notNull())
    .addColumn('before_json', 'text')
    .addColumn('after_json', 'text')
    .addColumn('prev_hash', 'text', (c) => c.notNull())
    .addColumn('hash', 'text', (c) => c.notNull())
    .addPrimaryKeyConstraint('audit_log_pk', ['organisation_id', 'seq'])
    .execute();
  await db.schema.createIndex('audit_log_entity').on('audit_log').columns(['entity_type', 'entity_id']).execute();
  await db.schema.createIndex('audit_log_org_at').on('audit_log').columns(['organisation_id', 'at']).execute();

  await db.schema
    .createTable('idempotency_keys')
    .addColumn('organisation_id', 'text', (c) => c.notNull())
    .addColumn('key', 'text', (c) => c.notNull())
    .addColumn('request_hash', 'text', (c) => c.notNull())
    .addColumn('status_code', 'integer')
    .addColumn('response_body', 'text')
    .addColumn('content_type', 'text')
    .addColumn('created_at', 'text', (c) => c.notNull())
    .addPrimaryKeyConstraint('idempotency_keys_pk', ['organisation_id', 'key'])
    .execute();

  await db.schema.createIndex('meters_facility').on('meters').column('facility_id').execute();
  await db.schema.createIndex('baselines_meter').on('baselines').columns(['meter_id', 'status']).execute();
}

export async function down(db: Kysely<unknown>): Promise<void> {
  for (const table of [
    'idempotency_keys',
    'audit_log',
    'baselines',
    'readings',
    'meters',
    'facilities',
    'weather_observations',
    'weather_stations',
    'api_keys',
    'organisations',
  ]) {
    await db.schema.dropTable(table).execute();
  }
}
