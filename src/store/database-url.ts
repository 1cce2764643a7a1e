/**
 * DATABASE_URL read: `sqlite:PATH`, `sqlite::memory:` or
 * `postgres://user@host:port/database` with our optional `schema=NAME`
 * parameter. Nothing is opened here.
 */
import type { Dialect } from './store.js';

/** DATABASE_URL cannot be used as written: the user can fix it. */
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

const SCHEMA_NAME = /^[a-z_][a-z0-9_]{0,62}$/;

/** The connection URL without our `schema` parameter, and that schema. */
export function splitPostgresUrl(url: string): { connectionString: string; schema: string | null } {
  let parsed: URL;
  try {
    parsed = new URL(url);
  } catch {
    throw new DatabaseUrlError('DATABASE_URL: not a valid postgres:// URL');
  }
  const schema = parsed.searchParams.get('schema');
  parsed.searchParams.delete('schema');
  if (schema !== null && !SCHEMA_NAME.test(schema)) {
    throw new DatabaseUrlError('DATABASE_URL: schema must be lower-case letters, digits and _ (at most 63)');
  }
  return { connectionString: parsed.toString(), schema };
}

/** A URL fit for messages: the password replaced. */
export function withoutPassword(url: string): string {
  const parsed = new URL(url);
  if (parsed.password) parsed.password = '***';
  return parsed.toString();
}
