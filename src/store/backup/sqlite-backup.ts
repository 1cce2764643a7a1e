/**
 * Backup of a SQLite ledger while the service runs: a separate connection
 * copies the file with SQLite's online backup API, all pages in one step, so
 * the copy is one consistent snapshot (WAL mode lets the service keep writing
 * meanwhile). The copy is written beside the target, checked, and renamed into place.
 */
import { renameSync, statSync, existsSync } from 'node:fs';
import { resolve } from 'node:path';
import { verifyLedger, type LedgerVerdict } from './verify-ledger.js';
import {
  BackupInputError,
  errorCode,
  mustBeWritableFileSpot,
  openLedgerFile,
  removeDatabaseFiles,
  withFileStore,
} from './sqlite-files.js';

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
