/**
 * PostgreSQL has its own tools: the pg_dump and pg_restore commands for a
 * DATABASE_URL, quoted for a POSIX shell, the password left out.
 */
import { splitPostgresUrl } from '../database-url.js';

/** Quote for a POSIX shell unless the text is plainly safe. */
function shellWord(text: string): string {
  return /^[A-Za-z0-9_./:@%+=,-]+$/.test(text) ? text : `'${text.replace(/'/g, `'\\''`)}'`;
}

/**
 * The pg_dump and pg_restore commands for a PostgreSQL DATABASE_URL, the
 * password left out (PGPASSWORD or ~/.pgpass supplies it), the schema named
 * by `?schema=` dumped alone.
 */
export function postgresGuidance(databaseUrl: string, file: string): string {
  const { connectionString, schema } = splitPostgresUrl(databaseUrl);
  const url = new URL(connectionString);
  url.password = '';
  const target = shellWord(url.toString());
  const dump = [
    'pg_dump',
    '--format=custom',
    '--no-owner',
    ...(schema ? [`--schema=${schema}`] : []),
    `--file=${shellWord(file)}`,
    `--dbname=${target}`,
  ];
  const restore = ['pg_restore', '--no-owner', '--single-transaction', `--dbname=${target}`, shellWord(file)];
  return [
    'mvledger backup and restore copy SQLite files only; for PostgreSQL use its own tools,',
    'giving the password with PGPASSWORD or ~/.pgpass (it is left out here).',
    'Back up (the service may keep running):',
    `  ${dump.join(' ')}`,
    'Restore into an empty database, with the service stopped:',
    `  ${restore.join(' ')}`,
    "Then check each organisation's ledger with GET /v1/audit/verify.",
    '',
  ].join('\n');
}
