/**
 * The transaction policy: one write transaction at a time per organisation
 * (an advisory lock on PostgreSQL, BEGIN IMMEDIATE on SQLite), and
 * consistent read snapshots, read again once when their connection died.
 */
import { PostgresAdapter, sql, type Kysely, type Transaction } from 'kysely';
import type { Database } from './schema.js';
import { databaseFault } from './faults.js';

/**
 * Run `work` as one write transaction of an organisation. On PostgreSQL it
 * first takes a transaction-scoped advisory lock on the organisation, so
 * writes of one organisation from any number of service instances go one at
 * a time: the audit chain stays one chain, and checks such as "no overlapping
 * reading" or "one frozen baseline" cannot race. (SQLite already runs one
 * write transaction at a time; the transaction takes its write lock first.)
 */
export function writeTransaction<T>(
  db: Kysely<Database>,
  organisationId: string,
  work: (trx: Transaction<Database>) => Promise<T>,
): Promise<T> {
  // 'read write' makes SQLite take its write lock at the start (see ImmediateWriteSqliteDriver).
  return db
    .transaction()
    .setAccessMode('read write')
    .execute(async (trx) => {
      await lockOrganisation(trx, organisationId);
      return work(trx);
    });
}

/**
 * Run `work` on one consistent snapshot of the database: repeatable read on
 * PostgreSQL; on SQLite a plain (deferred) transaction, whose first read
 * fixes the WAL snapshot and which holds this process's connection, so no
 * write of this process lands between its queries either. For reads that
 * must agree with each other (an export, a report and the audit head it names).
 */
export async function readSnapshot<T>(
  db: Kysely<Database>,
  work: (trx: Transaction<Database>) => Promise<T>,
): Promise<T> {
  const run = () =>
    (db.getExecutor().adapter instanceof PostgresAdapter
      ? db.transaction().setIsolationLevel('repeatable read')
      : db.transaction()
    ).execute(work);
  try {
    return await run();
  } catch (error) {
    // Read-only by contract: when its connection died, the whole snapshot is read again, once.
    if (databaseFault(error) !== 'connection-lost') throw error;
    return run();
  }
}

/**
 * One consistent read, never repeated: for work whose output has left the
 * process as it went (a streamed report), where a second run would write
 * it twice. A connection that dies fails it.
 */
export async function readSnapshotOnce<T>(
  db: Kysely<Database>,
  work: (trx: Transaction<Database>) => Promise<T>,
): Promise<T> {
  return (
    db.getExecutor().adapter instanceof PostgresAdapter
      ? db.transaction().setIsolationLevel('repeatable read')
      : db.transaction()
  ).execute(work);
}

/** Take the organisation's write lock inside a transaction (PostgreSQL; a no-op on SQLite). */
export async function lockOrganisation(trx: Transaction<Database>, organisationId: string): Promise<void> {
  if (trx.getExecutor().adapter instanceof PostgresAdapter) {
    await sql`select pg_advisory_xact_lock(hashtext(${organisationId}))`.execute(trx);
  }
}
