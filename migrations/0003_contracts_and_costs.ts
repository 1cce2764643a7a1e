/**
 * What finance and the contract need beyond the bare projection: non-routine
 * adjustments per meter, effective-dated contract rates per meter, the
 * contract with its yearly guarantees per facility, and a normal year of
 * daily temperatures per weather station.
 */
import type { Kysely } from 'kysely';

export async function up(db: Kysely<unknown>): Promise<void> {
  await db.schema
    .createTable('adjustments')
    .addColumn('id', 'text', (c) => c.primaryKey())
    .addColumn('organisation_id', 'text', (c) => c.notNull().references('organisations.id'))
    .addColumn('meter_id', 'text', (c) => c.notNull().references('meters.id'))
    .addColumn('period_start', 'text', (c) => c.notNull())
    .addColumn('period_end', 'text', (c) => c.notNull())
    .addColumn('quantity', 'double precision')
    .addColumn('per_day', 'double precision')
    .addColumn('reason', 'text', (c) => c.notNull())
    .addColumn('created_at', 'text', (c) => c.notNull())
    .addColumn('created_by', 'text', (c) => c.notNull())
    .addColumn('withdrawn_at', 'text')
    .addColumn('withdrawn_by', 'text')
    .addColumn('withdraw_reason', 'text')
    .execute();
  await db.schema.createIndex('adjustments_meter').on('adjustments').columns(['meter_id', 'period_start']).execute();

  await db.schema
    .createTable('rates')
    .addColumn('meter_id', 'text', (c) => c.notNull().references('meters.id'))
    .addColumn('effective_from', 'text', (c) => c.notNull())
    .addColumn('effective_to', 'text')
    .addColumn('price', 'double precision', (c) => c.notNull())
    .addColumn('escalation', 'double precision', (c) => c.notNull())
    .addColumn('currency', 'text', (c) => c.notNull())
    .addColumn('updated_at', 'text', (c) => c.notNull())
    .addPrimaryKeyConstraint('rates_pk', ['meter_id', 'effective_from'])
    .execute();

  await db.schema
    .createTable('contracts')
    .addColumn('facility_id', 'text', (c) => c.primaryKey().references('facilities.id'))
    .addColumn('organisation_id', 'text', (c) => c.notNull().references('organisations.id'))
    .addColumn('contract_start', 'text', (c) => c.notNull())
    .addColumn('years', 'integer', (c) => c.notNull())
    .addColumn('currency', 'text')
    .addColumn('energy_unit', 'text', (c) => c.notNull())
    .addColumn('guarantees_json', 'text', (c) => c.notNull())
    .addColumn('updated_at', 'text', (c) => c.notNull())
    .execute();

  await db.schema
    .createTable('normal_years')
    .addColumn('station_id', 'text', (c) => c.primaryKey().references('weather_stations.id'))
    .addColumn('source', 'text', (c) => c.notNull())
    .addColumn('temps_json', 'text', (c) => c.notNull())
    .addColumn('content_hash', 'text', (c) => c.notNull())
    .addColumn('updated_at', 'text', (c) => c.notNull())
    .execute();
}

export async function down(db: Kysely<unknown>): Promise<void> {
  for (const table of ['normal_years', 'contracts', 'rates', 'adjustments']) await db.schema.dropTable(table).execute();
}
