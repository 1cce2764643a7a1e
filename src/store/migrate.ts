/** Bring the schema up to date with kysely's Migrator, at every start. */
import { Migrator, PostgresAdapter, sql, type Kysely, type MigrationProvider } from 'kysely';
import { migrations } from '../../migrations/index.js';

const provider: MigrationProvider = { getMigrations: async () => migrations };

/** Takes any database type: migrations run before the typed schema exists. */
// eslint-disable-next-line @typescript-eslint/no-explicit-any
export async function migrateToLatest(db: Kysely<any>): Promise<string[]> {
  // On PostgreSQL the bookkeeping tables must be looked for in our own schema:
  // by default the migrator would accept a table of that name in any schema.
  const schema =
    db.getExecutor().adapter instanceof PostgresAdapter
      ? (await sql<{ schema: string }>`select current_schema() as schema`.execute(db)).rows[0]?.schema
      : undefined;
  const migrator = new Migrator({
    db,
    provider,
    migrationTableName: 'schema_migrations',
    migrationLockTableName: 'schema_migrations_lock',
    ...(schema ? { migrationTableSchema: schema } : {}),
    // Numbers are handed out to work done side by side, so a lower number can land after a higher one
    // has run somewhere (0009 after 0010): run it then, rather than refuse to start.
    allowUnorderedMigrations: true,
  });
  // On SQLite the migrator has no lock between processes: two processes
  // starting together on a new file can both try the same migration, and the
  // slower one fails ("table already exists"). Its retry then finds the
  // migration recorded and has nothing left to do. PostgreSQL locks instead,
  // but the migrator looks for its bookkeeping tables by listing the tables
  // of every schema, and a schema dropped meanwhile by someone else (as test
  // runs do) fails that listing; it is retried too.
  const attempts = schema === undefined ? SQLITE_ATTEMPTS : POSTGRES_ATTEMPTS;
  for (let attempt = 1; ; attempt++) {
    const { error, results } = await migrator.migrateToLatest();
    if (!error) return (results ?? []).filter((r) => r.status === 'Success').map((r) => r.migrationName);
    if (attempt >= attempts || (schema !== undefined && !isConcurrentCatalogChange(error))) {
      const failed = results?.find((r) => r.status === 'Error')?.migrationName ?? 'unknown';
      throw new Error(`database migration ${failed} failed: ${error instanceof Error ? error.message : String(error)}`);
    }
    await new Promise((resolve) => setTimeout(resolve, 50 * attempt + Math.random() * 100));
  }
}

const SQLITE_ATTEMPTS = 5;
const POSTGRES_ATTEMPTS = 5;

/**
 * A PostgreSQL error from the catalog changing under a query (another
 * session dropped a schema or table that the listing was reading):
 * invalid_schema_name (3F000), undefined_table (42P01), or an internal
 * "cache lookup failed" (XX000).
 */
function isConcurrentCatalogChange(error: unknown): boolean {
  const code = (error as { code?: unknown } | null)?.code;
  return (
    code === '3F000' ||
    code === '42P01' ||
    (code === 'XX000' && /cache lookup failed/.test(String((error as Error).message)))
  );
}
