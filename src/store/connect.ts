/**
 * Opening the database named by DATABASE_URL. SQLite is the embedded default:
 * `sqlite:./var/mvledger.sqlite` (a file, created with its folder) or
 * `sqlite::memory:`. Each SQLite connection runs in WAL mode with foreign keys
 * enforced and a busy timeout, so a second process waits instead of failing.
 *
 * `postgres://user@host:port/database` selects PostgreSQL through pg's pool;
 * an extra `schema=NAME` query parameter puts every table in that schema
 * (created if missing), which is how tests give every run its own. A
 * PostgreSQL connection that dies never takes the process with it: the pool
 * and every client have an error handler, and a read that lost its
 * connection is retried once (faults.ts says which errors those are).
 */
import { parseDatabaseUrl } from './database-url.js';
import { openPostgres } from './postgres-pool.js';
import { openSqlite } from './sqlite-connection.js';
import type { Store, StoreOptions } from './store.js';

export type { Dialect, Store, StoreEvent, StoreOptions } from './store.js';

/** Open the database DATABASE_URL names (DatabaseUrlError when it cannot be read). */
export function openStore(url: string, options: StoreOptions = {}): Store {
  const { dialect, location } = parseDatabaseUrl(url);
  return dialect === 'postgres' ? openPostgres(location, options) : openSqlite(location);
}
