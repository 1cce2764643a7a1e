/**
 * Weather days filled on record: weather_observations.fill_method says how a
 * day without an observation was filled ('interpolation' between its
 * neighbours, or 'second-station' from another station by a fitted offset),
 * null for an observed day (every day stored before); fill_note says from
 * what (the neighbours, or the station and fitted line with its RMSE).
 * One column per statement: SQLite adds one column at a time.
 */
import type { Kysely } from 'kysely';

export async function up(db: Kysely<unknown>): Promise<void> {
  await db.schema.alterTable('weather_observations').addColumn('fill_method', 'text').execute();
  await db.schema.alterTable('weather_observations').addColumn('fill_note', 'text').execute();
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await db.schema.alterTable('weather_observations').dropColumn('fill_note').execute();
  await db.schema.alterTable('weather_observations').dropColumn('fill_method').execute();
}
