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
import { mkdirSync } from 'node:fs';
import { dirname, resolve } from 'node:path';
import SQLite from 'better-sqlite3';
import {
  CompiledQuery,
  Kysely,
  PostgresAdapter,
  PostgresDialect,
  SqliteDialect,
  SqliteDriver,
  sql,
  type DatabaseConnection,
  type Driver,
  type PostgresDialectConfig,
  type QueryCompiler,
  type QueryResult,
  type SqliteDialectConfig,
  type Transaction,
  type TransactionSettings,
} from 'kysely';
import pg from 'pg';
import type { Database } from './schema.js';
import { databaseFault, faultRecord, type DatabaseFault } from './faults.js';

export type Dialect = 'sqlite' | 'postgres';

export interface Store {
  db: Kysely<Database>;
  dialect: Dialect;
  /** Where the data lives, for messages (never contains a password). */
  location: string;
  close(): Promise<void>;
}

/** What the store reports about database faults it survived (a dropped connection, a retried read). */
export interface StoreEvent {
  event: 'connection-error' | 'read-retried' | 'transaction-start-retried';
  fault: DatabaseFault | null;
  code?: string;
  message: string;
}

export interface StoreOptions {
  /** Told of every database fault the store survives; for the log. Never given a secret. */
  onEvent?: (event: StoreEvent) => void;
}

/** How long to wait for a new PostgreSQL connection before answering that the database is unreachable. */
export const POSTGRES_CONNECT_TIMEOUT_MS = 5000;
/** Pause before a read is retried on a fresh connection (our own figure: long enough for the pool to hear of its other dead connections). */
const RETRY_PAUSE_MS = 50;

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

export function openStore(url: string, options: StoreOptions = {}): Store {
  const { dialect, location } = parseDatabaseUrl(url);
  return dialect === 'postgres' ? openPostgres(location, options) : openSqlite(location);
}

const SCHEMA_NAME = /^[a-z_][a-z0-9_]{0,62}$/;

/** The connection URL without our `schema` parameter, and that schema. */
export function splitPostgresUrl(url: string): { connectionString: string; schema: string | null } {
  const parsed = new URL(url);
  const schema = parsed.searchParams.get('schema');
  parsed.searchParams.delete('schema');
  if (schema !== null && !SCHEMA_NAME.test(schema)) {
    throw new DatabaseUrlError('DATABASE_URL: schema must be lower-case letters, digits and _ (at most 63)');
  }
  return { connectionString: parsed.toString(), schema };
}

/** A URL fit for messages: the password replaced. */
function withoutPassword(url: string): string {
  const parsed = new URL(url);
  if (parsed.password) parsed.password = '***';
  return parsed.toString();
}

function openPostgres(url: string, options: StoreOptions): Store {
  const { connectionString, schema } = splitPostgresUrl(url);
  const pool = new pg.Pool({
    connectionString,
    max: 10,
    connectionTimeoutMillis: POSTGRES_CONNECT_TIMEOUT_MS,
    ...(schema ? { options: `-c search_path=${schema}` } : {}),
  });
  const tell = (event: StoreEvent['event'], error: unknown) => options.onEvent?.({ event, ...faultRecord(error) });
  // A connection that dies (a terminated backend, a restart, a failover) emits 'error': on the pool
  // while idle, on the client while it serves a query. Unheard, either event ends the process.
  // The pool drops the dead client; the query it served fails and is answered (or retried).
  pool.on('error', (error) => tell('connection-error', error));
  pool.on('connect', (client) => client.on('error', (error) => tell('connection-error', error)));
  const db = new Kysely<Database>({
    dialect: new ReadRetryPostgresDialect(
      {
        pool: async () => {
          if (schema) await createSchemaIfMissing(pool, schema);
          return pool;
        },
      },
      tell,
    ),
  });
  return { db, dialect: 'postgres', location: `postgresql ${withoutPassword(url)}`, close: () => db.destroy() };
}

/**
 * kysely's PostgreSQL dialect with one retry where a retry cannot store
 * anything twice: a read-only statement outside a transaction whose
 * connection died is run again, once, on a fresh connection; a transaction
 * whose first statement (BEGIN) found its connection dead starts again on a
 * fresh one. Anything else that fails on a dead connection (a statement in
 * a transaction, a commit) fails, and the caller answers it.
 */
class ReadRetryPostgresDialect extends PostgresDialect {
  readonly #tell: (event: StoreEvent['event'], error: unknown) => void;
  constructor(config: PostgresDialectConfig, tell: (event: StoreEvent['event'], error: unknown) => void) {
    super(config);
    this.#tell = tell;
  }
  override createDriver(): Driver {
    return new ReadRetryDriver(super.createDriver(), this.#tell);
  }
}

/** The connection kysely sees: it can swap the pooled connection under it for a fresh one. */
class SwappableConnection implements DatabaseConnection {
  inTransaction = false;
  constructor(
    public current: DatabaseConnection,
    private readonly driver: ReadRetryDriver,
  ) {}

  async executeQuery<R>(query: CompiledQuery): Promise<QueryResult<R>> {
    try {
      return await this.current.executeQuery<R>(query);
    } catch (error) {
      if (this.inTransaction || !isReadOnly(query) || !isConnectionLoss(error)) throw error;
      this.driver.tell('read-retried', error);
      await this.swap();
      return this.current.executeQuery<R>(query);
    }
  }

  streamQuery<R>(query: CompiledQuery, chunkSize?: number): AsyncIterableIterator<QueryResult<R>> {
    return this.current.streamQuery<R>(query, chunkSize);
  }

  /**
   * Hand back the dead connection (the pool drops a client that cannot
   * query) and take a fresh one. The short pause first lets the pool hear of
   * its other connections that died in the same event (a restart or a
   * failover ends them all), so the fresh one is not one of them.
   */
  async swap(): Promise<void> {
    const dead = this.current;
    await new Promise((resolve) => setTimeout(resolve, RETRY_PAUSE_MS));
    this.current = await this.driver.inner.acquireConnection();
    await this.driver.inner.releaseConnection(dead).catch(() => {});
  }
}

class ReadRetryDriver implements Driver {
  constructor(
    readonly inner: Driver,
    readonly tell: (event: StoreEvent['event'], error: unknown) => void,
  ) {}

  init(): Promise<void> {
    return this.inner.init();
  }
  async acquireConnection(): Promise<DatabaseConnection> {
    return new SwappableConnection(await this.inner.acquireConnection(), this);
  }
  async beginTransaction(connection: DatabaseConnection, settings: TransactionSettings): Promise<void> {
    const swappable = connection as SwappableConnection;
    try {
      await this.inner.beginTransaction(swappable.current, settings);
    } catch (error) {
      // Nothing has run in the transaction yet: starting it again on a fresh connection repeats nothing.
      if (!isConnectionLoss(error)) throw error;
      this.tell('transaction-start-retried', error);
      await swappable.swap();
      await this.inner.beginTransaction(swappable.current, settings);
    }
    swappable.inTransaction = true;
  }
  async commitTransaction(connection: DatabaseConnection): Promise<void> {
    const swappable = connection as SwappableConnection;
    try {
      await this.inner.commitTransaction(swappable.current);
    } finally {
      swappable.inTransaction = false;
    }
  }
  async rollbackTransaction(connection: DatabaseConnection): Promise<void> {
    const swappable = connection as SwappableConnection;
    swappable.inTransaction = false;
    try {
      await this.inner.rollbackTransaction(swappable.current);
    } catch (error) {
      // A dead connection's transaction is already rolled back by the server; the error that ended it is the one to report.
      if (!databaseFault(error)) throw error;
    }
  }
  async savepoint(connection: DatabaseConnection, name: string, compile: QueryCompiler['compileQuery']): Promise<void> {
    await this.inner.savepoint!((connection as SwappableConnection).current, name, compile);
  }
  async rollbackToSavepoint(connection: DatabaseConnection, name: string, compile: QueryCompiler['compileQuery']): Promise<void> {
    await this.inner.rollbackToSavepoint!((connection as SwappableConnection).current, name, compile);
  }
  async releaseSavepoint(connection: DatabaseConnection, name: string, compile: QueryCompiler['compileQuery']): Promise<void> {
    await this.inner.releaseSavepoint!((connection as SwappableConnection).current, name, compile);
  }
  releaseConnection(connection: DatabaseConnection): Promise<void> {
    return this.inner.releaseConnection((connection as SwappableConnection).current);
  }
  destroy(): Promise<void> {
    return this.inner.destroy();
  }
}

/** A connection that died under a statement (not one that could never be made: retrying that at once finds the same). */
function isConnectionLoss(error: unknown): boolean {
  return databaseFault(error) === 'connection-lost';
}

/** A statement that only reads: a SELECT built by kysely, or raw SQL that is a plain SELECT. */
function isReadOnly(query: CompiledQuery): boolean {
  if (query.query.kind === 'SelectQueryNode') return true;
  return query.query.kind === 'RawNode' && /^\s*select\b/i.test(query.sql) && !/\bfor\s+(update|share|no\s+key|key)\b/i.test(query.sql);
}

/**
 * `create schema if not exists` still fails (unique violation on the schema
 * name) when another process creates the same schema at that moment, as
 * instances starting together on a new schema do; the schema then exists,
 * which is all that is needed.
 */
async function createSchemaIfMissing(pool: pg.Pool, schema: string): Promise<void> {
  try {
    await pool.query(`create schema if not exists ${schema}`);
  } catch (error) {
    const found = await pool.query('select 1 from pg_namespace where nspname = $1', [schema]);
    if (found.rowCount === 0) throw error;
  }
}

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
export async function readSnapshot<T>(db: Kysely<Database>, work: (trx: Transaction<Database>) => Promise<T>): Promise<T> {
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
export async function readSnapshotOnce<T>(db: Kysely<Database>, work: (trx: Transaction<Database>) => Promise<T>): Promise<T> {
  return (
    db.getExecutor().adapter instanceof PostgresAdapter ? db.transaction().setIsolationLevel('repeatable read') : db.transaction()
  ).execute(work);
}

/** Take the organisation's write lock inside a transaction (PostgreSQL; a no-op on SQLite). */
export async function lockOrganisation(trx: Transaction<Database>, organisationId: string): Promise<void> {
  if (trx.getExecutor().adapter instanceof PostgresAdapter) {
    await sql`select pg_advisory_xact_lock(hashtext(${organisationId}))`.execute(trx);
  }
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
  const db = new Kysely<Database>({ dialect: new ImmediateWriteSqliteDialect({ database: withStatementCache(connection) }) });
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
