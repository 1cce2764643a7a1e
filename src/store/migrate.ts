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
  });
  const { error, results } = await migrator.migrateToLatest();
  if (error) {
    const failed = results?.find((r) => r.status === 'Error')?.migrationName ?? 'unknown';
    throw new Error(`database migration ${failed} failed: ${error instanceof Error ? error.message : String(error)}`);
  }
  return (results ?? []).filter((r) => r.status === 'Success').map((r) => r.migrationName);
}
