/**
 * Restore of a SQLite ledger, with the service stopped: the backup is copied
 * beside the target, migrated, and checked (every organisation's audit chain,
 * every frozen or superseded baseline's content hash); only a copy that
 * verifies is renamed over the target, so a failed restore leaves the
 * previous file as it was.
 */
import { copyFileSync, existsSync, mkdirSync, renameSync, rmSync, statSync } from 'node:fs';
import { dirname, resolve } from 'node:path';
import SQLite from 'better-sqlite3';
import { migrateToLatest } from '../migrate.js';
import { SQLITE_BUSY_TIMEOUT_MS } from '../sqlite-connection.js';
import { describeVerdict, verifyLedger, type LedgerVerdict } from './verify-ledger.js';
import {
  BackupInputError,
  errorCode,
  isNotADatabase,
  mustBeLedger,
  nonEmpty,
  notADatabase,
  removeDatabaseFiles,
  withFileStore,
} from './sqlite-files.js';

export interface RestoreSummary {
  input: string;
  target: string;
  /** Organisations the target held before (replaced under --force). */
  replacedOrganisations: number;
  /** Migrations the backup needed to reach the current schema. */
  migrations: string[];
  verdict: LedgerVerdict;
}

export async function restoreSqlite(
  inFile: string,
  targetFile: string,
  options: { force: boolean },
): Promise<RestoreSummary> {
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
      throw new BackupInputError(
        `--in ${inFile}: cannot copy it beside the database (${errorCode(error, 'unreadable')})`,
      );
    }
    const checked = await withFileStore(partial, async (db) => {
      await mustBeLedger(db, `--in ${inFile}`);
      const migrations = await migrateToLatest(db);
      return { migrations, verdict: await verifyLedger(db) };
    }).catch(notADatabase(`--in ${inFile}`));
    if (!checked.verdict.ok)
      throw new BackupInputError(`--in ${inFile} ${describeVerdict(checked.verdict)}; ${target} is left as it was`);
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
    const table = connection
      .prepare("select 1 from sqlite_master where type = 'table' and name = 'organisations'")
      .get();
    organisations = table
      ? (connection.prepare('select count(*) as n from organisations').get() as { n: number }).n
      : 0;
  } catch (error) {
    if (!isNotADatabase(error)) throw error;
    if (!force)
      throw new BackupInputError(`DATABASE_URL: ${target} is not an SQLite database; add --force to replace it`);
    return 0;
  } finally {
    connection.close();
  }
  if (existsSync(`${target}-wal`)) {
    throw new BackupInputError(
      `DATABASE_URL: ${target} is in use (its -wal file stays open); stop the service before restoring`,
    );
  }
  if (organisations > 0 && !force) {
    throw new BackupInputError(
      `DATABASE_URL: ${target} already holds ${organisations} organisation${organisations === 1 ? '' : 's'}; add --force to replace it`,
    );
  }
  return organisations;
}
