/**
 * Which database the API tests run on. The default project runs on SQLite;
 * the "postgres" project (vitest.config.ts) sets MVLEDGER_TEST_DIALECT and
 * every test service then gets its own fresh schema in the PostgreSQL
 * database named by MVLEDGER_TEST_POSTGRES_URL, dropped when it closes.
 */
import { randomBytes } from 'node:crypto';
import pg from 'pg';

export const DEFAULT_TEST_POSTGRES_URL = 'postgres://postgres@127.0.0.1:5432/test';

export function testDialect(): 'sqlite' | 'postgres' {
  return process.env.MVLEDGER_TEST_DIALECT === 'postgres' ? 'postgres' : 'sqlite';
}

export function testPostgresUrl(): string {
  return process.env.MVLEDGER_TEST_POSTGRES_URL ?? DEFAULT_TEST_POSTGRES_URL;
}

/** A fresh database for one test service: in-memory SQLite, or a new PostgreSQL schema. */
export function freshTestDatabaseUrl(): string {
  if (testDialect() === 'sqlite') return 'sqlite::memory:';
  const url = new URL(testPostgresUrl());
  url.searchParams.set('schema', `${schemaPrefix()}${process.pid}_${randomBytes(4).toString('hex')}`);
  return url.toString();
}

/** Schemas of this test run share a prefix, so the run can drop whatever a failed test left behind. */
export function schemaPrefix(): string {
  return `mvl_test_${process.env.MVLEDGER_TEST_RUN ?? 'x'}_`;
}

/** Drop every schema of this test run (the postgres project's global teardown). */
export async function dropRunSchemas(): Promise<number> {
  const client = new pg.Client({ connectionString: testPostgresUrl() });
  await client.connect();
  try {
    const { rows } = await client.query<{ nspname: string }>(
      'select nspname from pg_namespace where starts_with(nspname, $1)',
      [schemaPrefix()],
    );
    for (const row of rows) await client.query(`drop schema if exists ${row.nspname} cascade`);
    return rows.length;
  } finally {
    await client.end();
  }
}

/**
 * Migrated PostgreSQL schemas that a closed test service left empty, ready for
 * the next one in this worker. Migrating a new schema costs about a second
 * (dozens of DDL statements); emptying one costs one DELETE per table. A schema
 * whose tables differ from the migrated set (a test added or dropped one) is
 * dropped instead of reused.
 */
const idleSchemas: string[] = [];
let migratedTables: string | null = null;

/** Tables the migrator keeps its own bookkeeping in: kept when a schema is emptied. */
const MIGRATION_TABLES = new Set(['schema_migrations', 'schema_migrations_lock']);

/**
 * A database for one test service: in-memory SQLite, or an emptied migrated
 * schema (`migrated`: the caller may skip the migrator), or a new schema.
 */
export function acquireTestDatabase(): { url: string; migrated: boolean } {
  const idle = idleSchemas.pop();
  return idle ? { url: idle, migrated: true } : { url: freshTestDatabaseUrl(), migrated: false };
}

let cleaner: pg.Client | null = null;
/** One connection per worker empties the schemas (a new one per release costs more than the deletes). */
async function cleanerFor(connectionString: string): Promise<pg.Client> {
  if (cleaner) return cleaner;
  const client = new pg.Client({ connectionString });
  client.on('error', () => {
    cleaner = null;
  });
  await client.connect();
  cleaner = client;
  return client;
}

/**
 * Give back a URL from acquireTestDatabaseUrl once its service has closed: its
 * tables are emptied (the schema has no sequences) and the schema is kept for reuse.
 */
export async function releaseTestDatabase(databaseUrl: string): Promise<void> {
  if (!databaseUrl.startsWith('postgres')) return;
  const url = new URL(databaseUrl);
  const schema = url.searchParams.get('schema');
  if (!schema) return;
  url.searchParams.delete('schema');
  const client = await cleanerFor(url.toString());
  const { rows } = await client.query<{ table_name: string }>(
    `select table_name from information_schema.tables where table_schema = $1 and table_type = 'BASE TABLE' order by table_name`,
    [schema],
  );
  const names = rows.map((row) => row.table_name);
  const signature = names.join(',');
  migratedTables ??= names.includes('schema_migrations') ? signature : null;
  if (signature !== migratedTables) {
    await client.query(`drop schema if exists ${schema} cascade`);
    return;
  }
  // DELETE, not TRUNCATE: a test's tables hold a few rows, and TRUNCATE's new
  // files cost far more. The replica role skips the foreign-key and
  // append-only triggers for this one transaction (the test user is a superuser);
  // nothing here needs to survive a crash, so the commit does not wait for the disk.
  const deletes = names.filter((name) => !MIGRATION_TABLES.has(name)).map((name) => `delete from ${schema}."${name}";`);
  await client.query(
    `begin; set local session_replication_role = replica; set local synchronous_commit = off; ${deletes.join(' ')} commit;`,
  );
  idleSchemas.push(databaseUrl);
}

/** Drop the schema a PostgreSQL test URL names (nothing to do for SQLite). */
export async function dropTestDatabase(databaseUrl: string): Promise<void> {
  if (!databaseUrl.startsWith('postgres')) return;
  const url = new URL(databaseUrl);
  const schema = url.searchParams.get('schema');
  if (!schema) return;
  url.searchParams.delete('schema');
  const client = new pg.Client({ connectionString: url.toString() });
  await client.connect();
  try {
    await client.query(`drop schema if exists ${schema} cascade`);
  } finally {
    await client.end();
  }
}

/** True when a PostgreSQL server answers at the test URL (checked once by vitest.config.ts). */
export async function postgresReachable(url = testPostgresUrl()): Promise<boolean> {
  const client = new pg.Client({ connectionString: url, connectionTimeoutMillis: 2000 });
  try {
    await client.connect();
    await client.query('select 1');
    return true;
  } catch {
    return false;
  } finally {
    await client.end().catch(() => {});
  }
}
