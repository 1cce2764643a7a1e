/**
 * At most one frozen baseline per meter, enforced by the database itself (a
 * partial unique index, on SQLite and PostgreSQL alike), beneath the
 * service's own check and the per-organisation write lock.
 */
import { sql, type Kysely } from 'kysely';

export async function up(db: Kysely<unknown>): Promise<void> {
  await db.schema
    .createIndex('baselines_one_frozen_per_meter')
    .on('baselines')
    .column('meter_id')
    .unique()
    .where(sql.ref('status'), '=', 'frozen')
    .execute();
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await db.schema.dropIndex('baselines_one_frozen_per_meter').execute();
}
