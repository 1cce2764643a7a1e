/**
 * Independent variables and facility calendars:
 * - variables: a named series of a facility (meter_id null) or of one of its
 *   meters, with its unit, kind (daily or per-period) and aggregation (mean:
 *   a level holding on each day; total: an amount spread over its days). A
 *   name is unique per facility among its facility-wide variables and per
 *   meter among the meter's own (partial unique indexes).
 * - variable_values: one value per [period_start, period_end) of a
 *   variable; periods of one variable never overlap (the service checks).
 * - facility_calendars: a facility's day types, weekly pattern and dated
 *   exceptions, one JSON document per facility (replaced whole).
 */
import { sql, type Kysely } from 'kysely';

export async function up(db: Kysely<unknown>): Promise<void> {
  await db.schema
    .createTable('variables')
    .addColumn('id', 'text', (c) => c.primaryKey())
    .addColumn('organisation_id', 'text', (c) => c.notNull().references('organisations.id'))
    .addColumn('facility_id', 'text', (c) => c.notNull().references('facilities.id'))
    .addColumn('meter_id', 'text', (c) => c.references('meters.id'))
    .addColumn('name', 'text', (c) => c.notNull())
    .addColumn('unit', 'text', (c) => c.notNull())
    .addColumn('kind', 'text', (c) => c.notNull())
    .addColumn('aggregation', 'text', (c) => c.notNull())
    .addColumn('created_at', 'text', (c) => c.notNull())
    .addColumn('created_by', 'text', (c) => c.notNull())
    .execute();
  await db.schema
    .createIndex('variables_facility_name')
    .on('variables')
    .columns(['facility_id', 'name'])
    .unique()
    .where(sql.ref('meter_id'), 'is', null)
    .execute();
  await db.schema
    .createIndex('variables_meter_name')
    .on('variables')
    .columns(['meter_id', 'name'])
    .unique()
    .where(sql.ref('meter_id'), 'is not', null)
    .execute();
  await db.schema
    .createIndex('variables_organisation')
    .on('variables')
    .columns(['organisation_id', 'created_at'])
    .execute();

  await db.schema
    .createTable('variable_values')
    .addColumn('variable_id', 'text', (c) => c.notNull().references('variables.id'))
    .addColumn('period_start', 'text', (c) => c.notNull())
    .addColumn('period_end', 'text', (c) => c.notNull())
    .addColumn('value', 'double precision', (c) => c.notNull())
    .addColumn('updated_at', 'text', (c) => c.notNull())
    .addPrimaryKeyConstraint('variable_values_pk', ['variable_id', 'period_start'])
    .execute();

  await db.schema
    .createTable('facility_calendars')
    .addColumn('facility_id', 'text', (c) => c.primaryKey().references('facilities.id'))
    .addColumn('organisation_id', 'text', (c) => c.notNull().references('organisations.id'))
    .addColumn('calendar_json', 'text', (c) => c.notNull())
    .addColumn('updated_at', 'text', (c) => c.notNull())
    .addColumn('updated_by', 'text', (c) => c.notNull())
    .execute();
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await db.schema.dropTable('facility_calendars').execute();
  await db.schema.dropTable('variable_values').execute();
  await db.schema.dropTable('variables').execute();
}
