/**
 * SQLite ledger files as backup and restore meet them: opening one to read,
 * telling a ledger from another file, a store opened for one piece of work,
 * and the files beside a database (-wal, -shm, -journal).
 */
import { existsSync, rmSync, statSync } from 'node:fs';
import { dirname } from 'node:path';
import SQLite from 'better-sqlite3';
import { sql, type Kysely } from 'kysely';
import { openStore } from '../connect.js';
import { SQLITE_BUSY_TIMEOUT_MS } from '../sqlite-connection.js';
import type { Database } from '../schema.js';

/** The files or the database cannot be used as asked: the user can fix it (exit code 2). */
export class BackupInputError extends Error {
  override name = 'BackupInputError';
}

/** A better-sqlite3 connection on an existing mvledger file, for reading. */
export function openLedgerFile(path: string, what: string): SQLite.Database {
  const connection = new SQLite(path, { fileMustExist: true });
  try {
    connection.pragma(`busy_timeout = ${SQLITE_BUSY_TIMEOUT_MS}`);
    const table = connection
      .prepare("select 1 from sqlite_master where type = 'table' and name = 'organisations'")
      .get();
    if (!table)
      throw new BackupInputError(`${what}: ${path} is not an mvledger database (it has no organisations table)`);
    return connection;
  } catch (error) {
    connection.close();
    if (isNotADatabase(error)) throw new BackupInputError(`${what}: ${path} is not an SQLite database`);
    throw error;
  }
}

export async function mustBeLedger(db: Kysely<Database>, what: string): Promise<void> {
  const found = await sql<{
    name: string;
  }>`select name from sqlite_master where type = 'table' and name = 'organisations'`.execute(db);
  if (found.rows.length === 0)
    throw new BackupInputError(`${what}: not an mvledger backup (it has no organisations table)`);
}

/** Open a SQLite file as a store, run `work`, close (which folds and removes its -wal). */
export async function withFileStore<T>(path: string, work: (db: Kysely<Database>) => Promise<T>): Promise<T> {
  const store = (() => {
    try {
      return openStore(`sqlite:${path}`);
    } catch (error) {
      if (isNotADatabase(error)) throw new NotADatabase();
      throw error;
    }
  })();
  try {
    return await work(store.db);
  } finally {
    await store.close();
  }
}

export class NotADatabase extends Error {}

export function notADatabase(what: string): (error: unknown) => never {
  return (error) => {
    if (error instanceof NotADatabase || isNotADatabase(error))
      throw new BackupInputError(`${what}: not an SQLite database`);
    throw error;
  };
}

export function isNotADatabase(error: unknown): boolean {
  const code = (error as { code?: unknown } | null)?.code;
  return code === 'SQLITE_NOTADB' || code === 'SQLITE_CORRUPT';
}

export function errorCode(error: unknown, fallback: string): string {
  const code = (error as { code?: unknown } | null)?.code;
  return typeof code === 'string' ? code : fallback;
}

/** The folder must exist and `path` must not be a folder. */
export function mustBeWritableFileSpot(option: string, given: string, path: string): void {
  const folder = dirname(path);
  if (!existsSync(folder)) throw new BackupInputError(`${option} ${given}: cannot write it (ENOENT)`);
  if (!statSync(folder).isDirectory()) throw new BackupInputError(`${option} ${given}: cannot write it (ENOTDIR)`);
  if (existsSync(path) && statSync(path).isDirectory())
    throw new BackupInputError(`${option} ${given}: cannot write it (EISDIR)`);
}

export function nonEmpty(path: string): boolean {
  return existsSync(path) && statSync(path).size > 0;
}

export function removeDatabaseFiles(path: string): void {
  for (const suffix of ['', '-wal', '-shm', '-journal']) rmSync(`${path}${suffix}`, { force: true });
}
