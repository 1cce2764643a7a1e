/**
 * PostgreSQL through pg's pool: the connection timeout, the schema named by
 * the URL (created if missing), and an error handler on the pool and every
 * client, so a connection that dies never takes the process with it.
 */
import { Kysely } from 'kysely';
import pg from 'pg';
import type { Database } from './schema.js';
import { faultRecord } from './faults.js';
import { splitPostgresUrl, withoutPassword } from './database-url.js';
import { ReadRetryPostgresDialect } from './postgres-read-retry.js';
import type { Store, StoreEvent, StoreOptions } from './store.js';

/** How long to wait for a new PostgreSQL connection before answering that the database is unreachable. */
export const POSTGRES_CONNECT_TIMEOUT_MS = 5000;

export function openPostgres(url: string, options: StoreOptions): Store {
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
