/**
 * SQLite through better-sqlite3: the file (created with its folder) or
 * memory, the pragmas (WAL, foreign keys, busy timeout, synchronous NORMAL),
 * BEGIN IMMEDIATE for write transactions, and a cache of prepared statements.
 */
import { mkdirSync } from 'node:fs';
import { dirname, resolve } from 'node:path';
import SQLite from 'better-sqlite3';
import {
  CompiledQuery,
  Kysely,
  SqliteDialect,
  SqliteDriver,
  type DatabaseConnection,
  type Driver,
  type SqliteDialectConfig,
  type TransactionSettings,
} from 'kysely';
import type { Database } from './schema.js';
import type { Store } from './store.js';

export const SQLITE_BUSY_TIMEOUT_MS = 5000;

export function openSqlite(location: string): Store {
  const inMemory = location === ':memory:';
  const path = inMemory ? location : resolve(location);
  if (!inMemory) mkdirSync(dirname(path), { recursive: true });
  const connection = new SQLite(path);
  connection.pragma('journal_mode = WAL');
  connection.pragma('foreign_keys = ON');
  connection.pragma(`busy_timeout = ${SQLITE_BUSY_TIMEOUT_MS}`);
  connection.pragma('synchronous = NORMAL');
  const db = new Kysely<Database>({
    dialect: new ImmediateWriteSqliteDialect({ database: withStatementCache(connection) }),
  });
  return {
    db,
    dialect: 'sqlite',
    location: inMemory ? 'sqlite (in memory)' : `sqlite file ${path}`,
    close: () => db.destroy(),
  };
}

/**
 * SQLite's plain BEGIN reads first and asks for the write lock at the first
 * write. If another process (a second instance, the command line) wrote in
 * between, that upgrade fails at once with SQLITE_BUSY or
 * SQLITE_BUSY_SNAPSHOT, without waiting out the busy timeout (the request
 * answered 500). A 'read write' transaction (every writeTransaction) starts
 * with BEGIN IMMEDIATE instead: it waits for the write lock under the busy
 * timeout, then reads. Other transactions (consistent read snapshots) keep
 * BEGIN, so they never hold other processes' writers off.
 */
class ImmediateWriteSqliteDriver extends SqliteDriver {
  override async beginTransaction(connection: DatabaseConnection, settings?: TransactionSettings): Promise<void> {
    if (settings?.accessMode === 'read write') await connection.executeQuery(CompiledQuery.raw('begin immediate'));
    else await super.beginTransaction(connection);
  }
}

class ImmediateWriteSqliteDialect extends SqliteDialect {
  readonly #config: SqliteDialectConfig;
  constructor(config: SqliteDialectConfig) {
    super(config);
    this.#config = config;
  }
  override createDriver(): Driver {
    return new ImmediateWriteSqliteDriver(this.#config);
  }
}

/** How many distinct SQL texts keep a prepared statement (the API issues a few dozen shapes). */
const STATEMENT_CACHE_SIZE = 500;

/**
 * kysely prepares every query afresh; better-sqlite3 statements can be reused
 * (the driver runs each one to completion before the next), so keep the
 * prepared statement per SQL text, least recently used dropped first.
 */
function withStatementCache(connection: SQLite.Database): SQLite.Database {
  const cache = new Map<string, SQLite.Statement>();
  const prepare = (source: string): SQLite.Statement => {
    const cached = cache.get(source);
    if (cached) {
      cache.delete(source);
      cache.set(source, cached);
      return cached;
    }
    const statement = connection.prepare(source);
    cache.set(source, statement);
    if (cache.size > STATEMENT_CACHE_SIZE) cache.delete(cache.keys().next().value!);
    return statement;
  };
  return new Proxy(connection, {
    get(target, property, receiver) {
      if (property === 'prepare') return prepare;
      const value = Reflect.get(target, property, receiver);
      return typeof value === 'function' ? value.bind(target) : value;
    },
  });
}
