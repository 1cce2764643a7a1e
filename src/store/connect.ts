/**
 * Opening the database named by DATABASE_URL. SQLite is the embedded default:
 * `sqlite:./var/mvledger.sqlite` (a file, created with its folder) or
 * `sqlite::memory:`. Each SQLite connection runs in WAL mode with foreign keys
 * enforced and a busy timeout, so a second process waits instead of failing.
 */
import { mkdirSync } from 'node:fs';
import { dirname, resolve } from 'node:path';
import SQLite from 'better-sqlite3';
import { Kysely, SqliteDialect } from 'kysely';
import type { Database } from './schema.js';

export type Dialect = 'sqlite' | 'postgres';

export interface Store {
  db: Kysely<Database>;
  dialect: Dialect;
  /** Where the data lives, for messages (never contains a password). */
  location: string;
  close(): Promise<void>;
}

export const SQLITE_BUSY_TIMEOUT_MS = 5000;

export class DatabaseUrlError extends Error {}

/** Parse DATABASE_URL into a dialect and a location. */
export function parseDatabaseUrl(url: string): { dialect: Dialect; location: string } {
  if (url.startsWith('sqlite:')) {
    const location = url.slice('sqlite:'.length);
    if (location.length === 0) throw new DatabaseUrlError('DATABASE_URL: sqlite: needs a file path or :memory:');
    return { dialect: 'sqlite', location };
  }
  if (url.startsWith('postgres://') || url.startsWith('postgresql://')) {
    return { dialect: 'postgres', location: url };
  }
  throw new DatabaseUrlError('DATABASE_URL must start with sqlite: (for example sqlite:./var/mvledger.sqlite)');
}

export function openStore(url: string): Store {
  const { dialect, location } = parseDatabaseUrl(url);
  if (dialect === 'postgres') {
    throw new DatabaseUrlError('DATABASE_URL: PostgreSQL is not supported by this build yet; use sqlite:PATH');
  }
  return openSqlite(location);
}

function openSqlite(location: string): Store {
  const inMemory = location === ':memory:';
  const path = inMemory ? location : resolve(location);
  if (!inMemory) mkdirSync(dirname(path), { recursive: true });
  const connection = new SQLite(path);
  connection.pragma('journal_mode = WAL');
  connection.pragma('foreign_keys = ON');
  connection.pragma(`busy_timeout = ${SQLITE_BUSY_TIMEOUT_MS}`);
  connection.pragma('synchronous = NORMAL');
  const db = new Kysely<Database>({ dialect: new SqliteDialect({ database: connection }) });
  return {
    db,
    dialect: 'sqlite',
    location: inMemory ? 'sqlite (in memory)' : `sqlite file ${path}`,
    close: () => db.destroy(),
  };
}
