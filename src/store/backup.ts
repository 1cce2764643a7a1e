/**
 * Backing up and restoring a SQLite ledger file, and checking a ledger whole.
 *
 * Backup works while the service runs: a separate better-sqlite3 connection
 * copies the file with SQLite's online backup API, all pages in one step, so
 * the copy is one consistent snapshot (WAL mode lets the service keep writing
 * meanwhile). The copy is written beside the target and renamed into place.
 *
 * Restore needs the service stopped: the backup is copied beside the target,
 * migrated, and checked (every organisation's audit chain, every frozen or
 * superseded baseline's content hash); only a copy that verifies is renamed
 * over the target, so a failed restore leaves the previous file as it was.
 *
 * PostgreSQL has its own tools; `postgresGuidance` names the commands.
 */
import { copyFileSync, existsSync, mkdirSync, renameSync, rmSync, statSync } from 'node:fs';
import { dirname, resolve } from 'node:path';
import SQLite from 'better-sqlite3';
import { sql, type Kysely } from 'kysely';
import { verifyAllAuditChains } from './audit.js';
import { verifyBaselineContent } from './baseline-content.js';
import { SQLITE_BUSY_TIMEOUT_MS, openStore, splitPostgresUrl } from './connect.js';
import { migrateToLatest } from './migrate.js';
import type { Database } from './schema.js';

/** The files or the database cannot be used as asked: the user can fix it (exit code 2). */
export class BackupInputError extends Error {
  override name = 'BackupInputError';
}

export interface LedgerVerdict {
  ok: boolean;
  organisations: number;
  /** Audit rows checked, over every organisation's chain. */
  auditRows: number;
  /** Frozen and superseded baselines (and drafts claiming a hash) checked against their content hash. */
  baselines: number;
  /** The first fault found, in words. */
  fault?: string;
}

/** Check every organisation's audit chain and every frozen or superseded baseline's content hash. */
export async function verifyLedger(db: Kysely<Database>): Promise<LedgerVerdict> {
  const chains = await verifyAllAuditChains(db);
  const counts = { organisations: chains.chains, auditRows: chains.checked };
  if (!chains.ok) {
    const broken = chains.broken!;
    return {
      ok: false,
      ...counts,
      baselines: 0,
      fault: `the audit chain of organisation ${broken.organisationId} breaks at seq ${broken.seq}: ${broken.reason}`,
    };
  }
  const hashed = await db
    .selectFrom('baselines')
    .selectAll()
    .where((eb) => eb.or([eb('status', '!=', 'draft'), eb('content_hash', 'is not', null)]))
    .orderBy('id')
    .execute();
  const tampered = hashed.find((row) => !verifyBaselineContent(row));
  if (tampered) {
    return {
      ok: false,
      ...counts,
      baselines: hashed.length,
      fault: `baseline ${tampered.id} (${tampered.status}) does not match its content hash`,
    };
  }
  return { ok: true, ...counts, baselines: hashed.length };
}

/** The verdict as one clause. */
export function describeVerdict(verdict: LedgerVerdict): string {
  if (!verdict.ok) return `does not verify: ${verdict.fault}`;
  const plural = (n: number, one: string, many: string) => `${n} ${n === 1 ? one : many}`;
  return (
    `verified: ${plural(verdict.organisations, 'organisation', 'organisations')}, ` +
    `${plural(verdict.auditRows, 'audit row', 'audit rows')} in unbroken chains, ` +
    `${plural(verdict.baselines, 'frozen or superseded baseline matches its', 'frozen or superseded baselines match their')} content hash${verdict.baselines === 1 ? '' : 'es'}`
  );
}

// ---------------------------------------------------------------------------
// Backup.

export interface BackupSummary {
  source: string;
  out: string;
  bytes: number;
  /** The copy's own verdict: a faithful copy of a damaged ledger does not verify. */
  verdict: LedgerVerdict;
}

/** Pages per backup step: everything at once, so the copy is one snapshot and never restarts. */
const ALL_PAGES = 0x7fffffff;

export async function backupSqlite(sourceFile: string, outFile: string): Promise<BackupSummary> {
  const source = resolve(sourceFile);
  const out = resolve(outFile);
  if (['', '-wal', '-shm', '-journal'].some((suffix) => out === `${source}${suffix}`))
    throw new BackupInputError(`--out ${outFile}: that is the database itself (or one of its files)`);
  if (!existsSync(source)) throw new BackupInputError(`DATABASE_URL: no database file ${source} to back up`);
  mustBeWritableFileSpot('--out', outFile, out);

  const connection = openLedgerFile(source, 'DATABASE_URL');
  const partial = `${out}.partial-${process.pid}`;
  try {
    await connection.backup(partial, { progress: () => ALL_PAGES });
  } catch (error) {
    removeDatabaseFiles(partial);
    throw new BackupInputError(`--out ${outFile}: cannot write it (${errorCode(error, 'unwritable')})`);
  } finally {
    connection.close();
  }
  try {
    const verdict = await withFileStore(partial, verifyLedger);
    renameSync(partial, out);
    return { source, out, bytes: statSync(out).size, verdict };
  } catch (error) {
    removeDatabaseFiles(partial);
    throw error;
  }
}

// ---------------------------------------------------------------------------
// Restore.

export interface RestoreSummary {
  input: string;
  target: string;
  /** Organisations the target held before (replaced under --force). */
  replacedOrganisations: number;
  /** Migrations the backup needed to reach the current schema. */
  migrations: string[];
  verdict: LedgerVerdict;
}

export async function restoreSqlite(inFile: string, targetFile: string, options: { force: boolean }): Promise<RestoreSummary> {
  const input = resolve(inFile);
  const target = resolve(targetFile);
  if (input === target) throw new BackupInputError(`--in ${inFile}: that is the database itself`);
  if (!existsSync(input)) throw new BackupInputError(`--in ${inFile}: cannot read it (ENOENT)`);
  if (statSync(input).isDirectory()) throw new BackupInputError(`--in ${inFile}: is a folder, not a backup file`);
  if (nonEmpty(`${input}-wal`)) {
    throw new BackupInputError(
      `--in ${inFile}: a -wal file lies beside it, so the file alone is incomplete; use a file written by mvledger backup`,
    );
  }

  const replacedOrganisations = inspectTarget(target, options.force);
  mkdirSync(dirname(target), { recursive: true });
  const partial = `${target}.restoring-${process.pid}`;
  try {
    try {
      copyFileSync(input, partial);
    } catch (error) {
      throw new BackupInputError(`--in ${inFile}: cannot copy it beside the database (${errorCode(error, 'unreadable')})`);
    }
    const checked = await withFileStore(partial, async (db) => {
      await mustBeLedger(db, `--in ${inFile}`);
      const migrations = await migrateToLatest(db);
      return { migrations, verdict: await verifyLedger(db) };
    }).catch(notADatabase(`--in ${inFile}`));
    if (!checked.verdict.ok) throw new BackupInputError(`--in ${inFile} ${describeVerdict(checked.verdict)}; ${target} is left as it was`);
    // A stale -wal beside the target would be replayed into the restored file.
    for (const suffix of ['-wal', '-shm']) rmSync(`${target}${suffix}`, { force: true });
    renameSync(partial, target);
    return { input, target, replacedOrganisations, ...checked };
  } finally {
    removeDatabaseFiles(partial);
  }
}

/**
 * How many organisations the target holds; refuses a target in use, and one
 * with organisations (or not a database at all) unless forced. Opening and
 * closing the last connection folds any -wal into the file and deletes it, so
 * a -wal that remains means another connection (the service) has it open.
 */
function inspectTarget(target: string, force: boolean): number {
  if (!existsSync(target)) return 0;
  if (statSync(target).isDirectory()) throw new BackupInputError(`DATABASE_URL: ${target} is a folder`);
  let organisations: number;
  const connection = new SQLite(target, { fileMustExist: true });
  try {
    connection.pragma(`busy_timeout = ${SQLITE_BUSY_TIMEOUT_MS}`);
    const table = connection.prepare("select 1 from sqlite_master where type = 'table' and name = 'organisations'").get();
    organisations = table ? (connection.prepare('select count(*) as n from organisations').get() as { n: number }).n : 0;
  } catch (error) {
    if (!isNotADatabase(error)) throw error;
    if (!force) throw new BackupInputError(`DATABASE_URL: ${target} is not an SQLite database; add --force to replace it`);
    return 0;
  } finally {
    connection.close();
  }
  if (existsSync(`${target}-wal`)) {
    throw new BackupInputError(`DATABASE_URL: ${target} is in use (its -wal file stays open); stop the service before restoring`);
  }
  if (organisations > 0 && !force) {
    throw new BackupInputError(
      `DATABASE_URL: ${target} already holds ${organisations} organisation${organisations === 1 ? '' : 's'}; add --force to replace it`,
    );
  }
  return organisations;
}

// ---------------------------------------------------------------------------
// PostgreSQL.

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

// ---------------------------------------------------------------------------
// Helpers.

/** A better-sqlite3 connection on an existing mvledger file, for reading. */
function openLedgerFile(path: string, what: string): SQLite.Database {
  const connection = new SQLite(path, { fileMustExist: true });
  try {
    connection.pragma(`busy_timeout = ${SQLITE_BUSY_TIMEOUT_MS}`);
    const table = connection.prepare("select 1 from sqlite_master where type = 'table' and name = 'organisations'").get();
    if (!table) throw new BackupInputError(`${what}: ${path} is not an mvledger database (it has no organisations table)`);
    return connection;
  } catch (error) {
    connection.close();
    if (isNotADatabase(error)) throw new BackupInputError(`${what}: ${path} is not an SQLite database`);
    throw error;
  }
}

async function mustBeLedger(db: Kysely<Database>, what: string): Promise<void> {
  const found = await sql<{ name: string }>`select name from sqlite_master where type = 'table' and name = 'organisations'`.execute(db);
  if (found.rows.length === 0) throw new BackupInputError(`${what}: not an mvledger backup (it has no organisations table)`);
}

/** Open a SQLite file as a store, run `work`, close (which folds and removes its -wal). */
async function withFileStore<T>(path: string, work: (db: Kysely<Database>) => Promise<T>): Promise<T> {
  const store = (() => {
    try {
      return openStore(`sqlite:${path}`);
    } catch (error) {
      if (isNotADatabase(error)) throw new NotADatabase();
      throw error;
    }
  })();
  try {
    return await work(store.db);
  } finally {
    await store.close();
  }
}

class NotADatabase extends Error {}

function notADatabase(what: string): (error: unknown) => never {
  return (error) => {
    if (error instanceof NotADatabase || isNotADatabase(error)) throw new BackupInputError(`${what}: not an SQLite database`);
    throw error;
  };
}

function isNotADatabase(error: unknown): boolean {
  const code = (error as { code?: unknown } | null)?.code;
  return code === 'SQLITE_NOTADB' || code === 'SQLITE_CORRUPT';
}

function errorCode(error: unknown, fallback: string): string {
  const code = (error as { code?: unknown } | null)?.code;
  return typeof code === 'string' ? code : fallback;
}

/** The folder must exist and `path` must not be a folder. */
function mustBeWritableFileSpot(option: string, given: string, path: string): void {
  const folder = dirname(path);
  if (!existsSync(folder)) throw new BackupInputError(`${option} ${given}: cannot write it (ENOENT)`);
  if (!statSync(folder).isDirectory()) throw new BackupInputError(`${option} ${given}: cannot write it (ENOTDIR)`);
  if (existsSync(path) && statSync(path).isDirectory()) throw new BackupInputError(`${option} ${given}: cannot write it (EISDIR)`);
}

function nonEmpty(path: string): boolean {
  return existsSync(path) && statSync(path).size > 0;
}

function removeDatabaseFiles(path: string): void {
  for (const suffix of ['', '-wal', '-shm', '-journal']) rmSync(`${path}${suffix}`, { force: true });
}
