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
export { verifyLedger, describeVerdict, type LedgerVerdict } from './verify-ledger.js';
export { BackupInputError } from './sqlite-files.js';
export { backupSqlite, type BackupSummary } from './sqlite-backup.js';
export { restoreSqlite, type RestoreSummary } from './sqlite-restore.js';
export { postgresGuidance } from './postgres-guidance.js';
