/**
 * A meter's data version: one row per meter holding a random token that
 * every write able to change the meter's savings (or its part of a report)
 * replaces in the same transaction. Savings are computed once per token and
 * served from memory while it stands (src/services/savings-cache.ts). A
 * token, not a counter: a database restored to an earlier state brings back
 * the token that went with that state, so a cache can never match a token
 * to other data. Derived bookkeeping, not ledger content: not exported.
 * Existing meters get a fresh token each.
 */
import { randomUUID } from 'node:crypto';
import type { Kysely } from 'kysely';

// eslint-disable-next-line @typescript-eslint/no-explicit-any
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('meter_data_versions')
    .addColumn('meter_id', 'text', (c) => c.primaryKey().references('meters.id'))
    .addColumn('version', 'text', (c) => c.notNull())
    .execute();
  const meters = (await db.selectFrom('meters').select('id').execute()) as { id: string }[];
  for (let i = 0; i < meters.length; i += 500) {
    const rows = meters.slice(i, i + 500).map((m) => ({ meter_id: m.id, version: randomUUID() }));
    await db.insertInto('meter_data_versions').values(rows).execute();
  }
}

// eslint-disable-next-line @typescript-eslint/no-explicit-any
export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('meter_data_versions').execute();
}
