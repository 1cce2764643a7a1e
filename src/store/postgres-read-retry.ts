/**
 * The one retry on PostgreSQL, where a retry cannot store anything twice:
 * kysely's dialect with a driver whose connection can be swapped for a
 * fresh one under a read or a transaction's BEGIN.
 */
import {
  CompiledQuery,
  PostgresDialect,
  type DatabaseConnection,
  type Driver,
  type PostgresDialectConfig,
  type QueryCompiler,
  type QueryResult,
  type TransactionSettings,
} from 'kysely';
import { databaseFault } from './faults.js';
import type { StoreEvent } from './store.js';

/** Pause before a read is retried on a fresh connection (our own figure: long enough for the pool to hear of its other dead connections). */
const RETRY_PAUSE_MS = 50;

/**
 * kysely's PostgreSQL dialect with one retry where a retry cannot store
 * anything twice: a read-only statement outside a transaction whose
 * connection died is run again, once, on a fresh connection; a transaction
 * whose first statement (BEGIN) found its connection dead starts again on a
 * fresh one. Anything else that fails on a dead connection (a statement in
 * a transaction, a commit) fails, and the caller answers it.
 */
export class ReadRetryPostgresDialect extends PostgresDialect {
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
  async rollbackToSavepoint(
    connection: DatabaseConnection,
    name: string,
    compile: QueryCompiler['compileQuery'],
  ): Promise<void> {
    await this.inner.rollbackToSavepoint!((connection as SwappableConnection).current, name, compile);
  }
  async releaseSavepoint(
    connection: DatabaseConnection,
    name: string,
    compile: QueryCompiler['compileQuery'],
  ): Promise<void> {
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
  return (
    query.query.kind === 'RawNode' &&
    /^\s*select\b/i.test(query.sql) &&
    !/\bfor\s+(update|share|no\s+key|key)\b/i.test(query.sql)
  );
}
