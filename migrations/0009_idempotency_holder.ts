/**
 * Which process holds an idempotency key in flight: `host/pid/start` (the
 * host name, the process id and the process's start time), so a restarted
 * service can release the keys of a process that died mid-request on its
 * host, and a retry can take over such a key at once instead of waiting for
 * it to go stale. Rows from before have no holder and go stale by age as
 * they always did.
 */
import type { Kysely } from 'kysely';

// eslint-disable-next-line @typescript-eslint/no-explicit-any
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable('idempotency_keys').addColumn('holder', 'text').execute();
}

// eslint-disable-next-line @typescript-eslint/no-explicit-any
export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable('idempotency_keys').dropColumn('holder').execute();
}
