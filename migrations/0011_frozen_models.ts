/**
 * Frozen baselines' models in the compact form savings and reports project
 * with (src/services/frozen-models.ts): one row per frozen baseline, derived
 * from its content when it is frozen and bound to its content hash. Derived
 * bookkeeping, not ledger content: not exported, and never trusted over the
 * content (a row that does not check out is derived again). The models of
 * baselines frozen before this migration are derived when the service
 * starts (storeMissingFrozenModels), not here: a migration stays free of the
 * engine, which changes after it. An index covers what reports read of
 * each meter's frozen baseline.
 */
import type { Kysely } from 'kysely';

// eslint-disable-next-line @typescript-eslint/no-explicit-any
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('frozen_models')
    .addColumn('baseline_id', 'text', (c) => c.primaryKey().references('baselines.id'))
    .addColumn('content_hash', 'text', (c) => c.notNull())
    .addColumn('format', 'integer', (c) => c.notNull())
    .addColumn('model_json', 'text', (c) => c.notNull())
    .addColumn('model_hash', 'text', (c) => c.notNull())
    .execute();
  // What a report reads of every meter's frozen baseline, answered from the index alone: on SQLite the
  // content hash sits behind some 50 KB of JSON in the row, which a lookup of it would read through.
  await db.schema
    .createIndex('baselines_frozen_summary')
    .on('baselines')
    .columns(['meter_id', 'status', 'id', 'version', 'content_hash', 'period_start', 'period_end', 'temperature_form'])
    .execute();
}

// eslint-disable-next-line @typescript-eslint/no-explicit-any
export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropIndex('baselines_frozen_summary').execute();
  await db.schema.dropTable('frozen_models').execute();
}
