/**
 * Pieces the operator commands (keys, export, import) share: strict option
 * parsing that turns node's errors into one-line usage errors, and opening
 * the database named by DATABASE_URL (migrated first, closed after).
 */
import { parseArgs, type ParseArgsConfig } from 'node:util';
import { openStore, type Store } from '../store/connect.js';
import { DatabaseUrlError } from '../store/database-url.js';
import { migrateToLatest } from '../store/migrate.js';
import { describeParseError, UsageError } from './errors.js';

export { describeParseError };

export type OptionValues = Record<string, string | boolean | undefined>;

/** parseArgs with strict options; every failure becomes a UsageError in plain words. */
export function parseOptions(
  args: readonly string[],
  options: NonNullable<ParseArgsConfig['options']>,
  allowPositionals: boolean,
): { values: OptionValues; positionals: string[] } {
  try {
    const parsed = parseArgs({ args: [...args], options, strict: true, allowPositionals });
    return { values: parsed.values as OptionValues, positionals: parsed.positionals };
  } catch (error) {
    throw new UsageError(describeParseError(error));
  }
}

/** Open the database, bring its schema up to date, run `work`, close. A bad DATABASE_URL is a usage error. */
export async function withDatabase<T>(databaseUrl: string, work: (store: Store) => Promise<T>): Promise<T> {
  let store: Store;
  try {
    store = openStore(databaseUrl);
  } catch (error) {
    if (error instanceof DatabaseUrlError) throw new UsageError(error.message);
    throw error;
  }
  try {
    await migrateToLatest(store.db);
    return await work(store);
  } finally {
    await store.close();
  }
}
