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
    const { rows } = await client.query<{ nspname: string }>('select nspname from pg_namespace where starts_with(nspname, $1)', [
      schemaPrefix(),
    ]);
    for (const row of rows) await client.query(`drop schema if exists ${row.nspname} cascade`);
    return rows.length;
  } finally {
    await client.end();
  }
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
