/**
 * `mvledger backup --out FILE` and `mvledger restore --in FILE [--force]` on
 * the SQLite file named by DATABASE_URL; for PostgreSQL they print the
 * pg_dump / pg_restore commands and exit 2. The work is done by
 * store/backup/; this module reads the arguments and prints one line.
 */
import { DatabaseUrlError, parseDatabaseUrl, splitPostgresUrl } from '../../store/database-url.js';
import {
  BackupInputError,
  backupSqlite,
  describeVerdict,
  postgresGuidance,
  restoreSqlite,
} from '../../store/backup/index.js';
import { EXIT_BAD_INPUT, UsageError } from '../errors.js';
import { BACKUP_USAGE, RESTORE_USAGE } from '../usage.js';
import { parseOptions, type OptionValues } from '../shared.js';
import { DEFAULT_DATABASE_URL } from './keys.js';

/** `stdout` is the result; `note` goes to stderr; `code` is the exit code (0 when absent). */
export interface BackupOutput {
  stdout: string;
  note?: string;
  code?: number;
}

const BACKUP_SPEC = { out: { type: 'string' }, help: { type: 'boolean', short: 'h' } } as const;
const RESTORE_SPEC = {
  in: { type: 'string' },
  force: { type: 'boolean' },
  help: { type: 'boolean', short: 'h' },
} as const;

export async function runBackup(args: readonly string[], env: NodeJS.ProcessEnv = process.env): Promise<BackupOutput> {
  const values = parseStrict(args, BACKUP_SPEC);
  if (values.help) return { stdout: BACKUP_USAGE };
  const out = requiredText(values, 'out', '--out FILE is required (where to write the backup)');
  const database = sqliteFileOf(env, 'back up');
  if (database.postgres !== undefined)
    return { stdout: '', note: postgresGuidance(database.postgres, out), code: EXIT_BAD_INPUT };
  const summary = await backupSqlite(database.file, out).catch(asUsage);
  const line = `backed up sqlite file ${summary.source} to ${summary.out} (${summary.bytes} bytes)`;
  if (!summary.verdict.ok) {
    // The copy is faithful and kept; the ledger it copied is damaged.
    return {
      stdout: '',
      note: `mvledger: ${line}, but the ledger ${describeVerdict(summary.verdict)}\n`,
      code: EXIT_BAD_INPUT,
    };
  }
  return { stdout: `${line}; ${describeVerdict(summary.verdict)}\n` };
}

export async function runRestore(args: readonly string[], env: NodeJS.ProcessEnv = process.env): Promise<BackupOutput> {
  const values = parseStrict(args, RESTORE_SPEC);
  if (values.help) return { stdout: RESTORE_USAGE };
  const input = requiredText(values, 'in', '--in FILE is required (a file written by mvledger backup)');
  const database = sqliteFileOf(env, 'restore into');
  if (database.postgres !== undefined)
    return { stdout: '', note: postgresGuidance(database.postgres, input), code: EXIT_BAD_INPUT };
  const summary = await restoreSqlite(input, database.file, { force: values.force === true }).catch(asUsage);
  const replaced =
    summary.replacedOrganisations > 0
      ? `, replacing ${summary.replacedOrganisations} organisation${summary.replacedOrganisations === 1 ? '' : 's'}`
      : '';
  const migrated = summary.migrations.length > 0 ? `, migrated (${summary.migrations.join(', ')})` : '';
  return {
    stdout: `restored ${summary.input} into sqlite file ${summary.target}${replaced}${migrated}; ${describeVerdict(summary.verdict)}\n`,
  };
}

/** The SQLite file DATABASE_URL names, or the PostgreSQL URL to give guidance for. */
function sqliteFileOf(
  env: NodeJS.ProcessEnv,
  verb: string,
): { file: string; postgres?: undefined } | { file?: undefined; postgres: string } {
  const url = env.DATABASE_URL ?? DEFAULT_DATABASE_URL;
  let parsed: ReturnType<typeof parseDatabaseUrl>;
  try {
    parsed = parseDatabaseUrl(url);
    if (parsed.dialect === 'postgres') splitPostgresUrl(parsed.location);
  } catch (error) {
    if (error instanceof DatabaseUrlError) throw new UsageError(error.message);
    throw error;
  }
  if (parsed.dialect === 'postgres') return { postgres: parsed.location };
  if (parsed.location === ':memory:') throw new UsageError(`DATABASE_URL: sqlite::memory: is no file to ${verb}`);
  return { file: parsed.location };
}

function asUsage(error: unknown): never {
  if (error instanceof BackupInputError) throw new UsageError(error.message);
  throw error;
}

function parseStrict(args: readonly string[], spec: typeof BACKUP_SPEC | typeof RESTORE_SPEC): OptionValues {
  const { values, positionals } = parseOptions(args, spec, true);
  if (positionals.length > 0) throw new UsageError(`unexpected argument ${positionals[0]}`);
  return values;
}

function requiredText(values: OptionValues, option: string, whenMissing: string): string {
  const value = values[option];
  if (value === undefined) throw new UsageError(whenMissing);
  const text = String(value).trim();
  if (text === '') throw new UsageError(`--${option} must not be empty`);
  return text;
}
