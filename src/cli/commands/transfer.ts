/**
 * `mvledger export --org ID [--out FILE]` and `mvledger import --in FILE`:
 * move one organisation between databases (DATABASE_URL names the source of
 * an export and the target of an import) as one JSON document. The work is
 * done by store/transfer/; this module reads the arguments and files and
 * reports one line per table on stderr (row counts only, never a secret).
 */
import { existsSync, readFileSync, renameSync, rmSync, writeFileSync } from 'node:fs';
import { storeMissingFrozenModels } from '../../services/frozen-models.js';
import type { Store } from '../../store/connect.js';
import { findOrganisation } from '../../store/organisations.js';
import { DatabaseUrlError, parseDatabaseUrl } from '../../store/database-url.js';
import {
  TRANSFER_TABLES,
  TransferInputError,
  exportOrganisation,
  importOrganisation,
  type TransferTable,
} from '../../store/transfer/index.js';
import { UsageError } from '../errors.js';
import { EXPORT_USAGE, IMPORT_USAGE } from '../usage.js';
import { DEFAULT_DATABASE_URL } from './keys.js';
import { parseOptions, withDatabase } from '../shared.js';

/** `stdout` is the result; `note` goes to stderr. */
export interface TransferOutput {
  stdout: string;
  note?: string;
}

type Values = Record<string, string | boolean | undefined>;

const EXPORT_SPEC = {
  org: { type: 'string' },
  out: { type: 'string' },
  help: { type: 'boolean', short: 'h' },
} as const;
const IMPORT_SPEC = { in: { type: 'string' }, help: { type: 'boolean', short: 'h' } } as const;

export async function runExport(
  args: readonly string[],
  env: NodeJS.ProcessEnv = process.env,
  now: () => string = () => new Date().toISOString(),
): Promise<TransferOutput> {
  const values = parseStrict(args, EXPORT_SPEC);
  if (values.help) return { stdout: EXPORT_USAGE };
  const organisationId = requiredText(values, 'org', '--org ID is required (the organisation to export)');
  const out = values.out === undefined ? undefined : requiredText(values, 'out', '');
  const databaseUrl = env.DATABASE_URL ?? DEFAULT_DATABASE_URL;
  refuseMissingSqliteFile(databaseUrl);
  return withStore(databaseUrl, async (store) => {
    const found = await findOrganisation(store.db, organisationId);
    if (!found) throw new UsageError(`--org: no organisation ${organisationId} in ${store.location}`);
    const document = await exportOrganisation(store.db, organisationId, now()).catch(asUsage(''));
    const text = `${JSON.stringify(document)}\n`;
    if (out !== undefined) writeWhole(out, text);
    const lines = [
      `exported organisation ${document.organisation.id} (${JSON.stringify(document.organisation.name)}) from ${store.location} to ${out ?? 'stdout'}: ${Buffer.byteLength(text)} bytes`,
      ...tableLines(
        Object.fromEntries(TRANSFER_TABLES.map((table) => [table, document.tables[table].length])) as Record<
          TransferTable,
          number
        >,
      ),
      `audit head: seq ${document.auditHead.seq}, hash ${document.auditHead.hash}`,
    ];
    return { stdout: out === undefined ? text : '', note: `${lines.join('\n')}\n` };
  });
}

export async function runImport(
  args: readonly string[],
  env: NodeJS.ProcessEnv = process.env,
): Promise<TransferOutput> {
  const values = parseStrict(args, IMPORT_SPEC);
  if (values.help) return { stdout: IMPORT_USAGE };
  const file = requiredText(values, 'in', '--in FILE is required (a document written by mvledger export)');
  // The file is read and parsed before the target is opened: a bad file never touches it.
  const input = readDocument(file);
  return withStore(env.DATABASE_URL ?? DEFAULT_DATABASE_URL, async (store) => {
    const summary = await importOrganisation(store.db, input).catch(asUsage(`${file}: `));
    // Derived bookkeeping is not carried by the document: the imported frozen baselines' compact models are derived here.
    const models = await storeMissingFrozenModels(store.db);
    const lines = [
      `imported organisation ${summary.organisation.id} (${JSON.stringify(summary.organisation.name)}) into ${store.location}`,
      ...tableLines(summary.rows),
      `audit head: seq ${summary.auditHead.seq}, hash ${summary.auditHead.hash} (verified in the target)`,
      `frozen models derived from their baselines' content: ${models}`,
    ];
    return { stdout: '', note: `${lines.join('\n')}\n` };
  });
}

function tableLines(rows: Record<TransferTable, number>): string[] {
  return TRANSFER_TABLES.map((table) => `  ${table}: ${rows[table]} ${rows[table] === 1 ? 'row' : 'rows'}`);
}

/** A TransferInputError is the user's to fix (exit 2); anything else stays internal (exit 1). */
function asUsage(prefix: string): (error: unknown) => never {
  return (error) => {
    if (error instanceof TransferInputError) throw new UsageError(`${prefix}${error.message}`);
    throw error;
  };
}

function parseStrict(args: readonly string[], spec: typeof EXPORT_SPEC | typeof IMPORT_SPEC): Values {
  const { values, positionals } = parseOptions(args, spec, true);
  if (positionals.length > 0) throw new UsageError(`unexpected argument ${positionals[0]}`);
  return values as Values;
}

function requiredText(values: Values, option: string, whenMissing: string): string {
  const value = values[option];
  if (value === undefined) throw new UsageError(whenMissing);
  const text = String(value).trim();
  if (text === '') throw new UsageError(`--${option} must not be empty`);
  return text;
}

/** Exporting from a mistyped SQLite path must not leave a new, empty database behind. */
function refuseMissingSqliteFile(databaseUrl: string): void {
  let parsed: ReturnType<typeof parseDatabaseUrl>;
  try {
    parsed = parseDatabaseUrl(databaseUrl);
  } catch (error) {
    if (error instanceof DatabaseUrlError) throw new UsageError(error.message);
    throw error;
  }
  if (parsed.dialect === 'sqlite' && parsed.location !== ':memory:' && !existsSync(parsed.location)) {
    throw new UsageError(`DATABASE_URL: no database file ${parsed.location} to export from`);
  }
}

function readDocument(file: string): unknown {
  let text: string;
  try {
    text = readFileSync(file, 'utf8');
  } catch (error) {
    const code = (error as { code?: unknown }).code;
    throw new UsageError(`--in ${file}: cannot read it (${typeof code === 'string' ? code : 'unreadable'})`);
  }
  try {
    return JSON.parse(text) as unknown;
  } catch (error) {
    throw new UsageError(`${file}: not a JSON document (${error instanceof Error ? error.message : String(error)})`);
  }
}

/** Write beside the target and rename, so a failed export never leaves half a document under FILE. */
function writeWhole(file: string, text: string): void {
  const partial = `${file}.partial-${process.pid}`;
  try {
    writeFileSync(partial, text);
    renameSync(partial, file);
  } catch (error) {
    rmSync(partial, { force: true });
    const code = (error as { code?: unknown }).code;
    throw new UsageError(`--out ${file}: cannot write it (${typeof code === 'string' ? code : 'unwritable'})`);
  }
}

function withStore(databaseUrl: string, work: (store: Store) => Promise<TransferOutput>): Promise<TransferOutput> {
  return withDatabase(databaseUrl, work);
}
