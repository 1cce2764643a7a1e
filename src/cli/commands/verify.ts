/**
 * `mvledger verify`: two checks of an organisation's audit trail.
 * - Online (`--org ID [--full]`, database from DATABASE_URL): the chain, every
 *   frozen baseline against its freeze row and, with --full, every table
 *   against a replay of the trail (services/audit.ts).
 * - Offline (`--export FILE --public-key FILE --checkpoints FILE`): an
 *   export, the service's public key and signed checkpoints, and nothing
 *   else: the trail up to each checkpoint is the one the service signed
 *   (store/checkpoint-proof.ts).
 * The report goes to stdout, one finding per line; exit code 0 when every
 * check holds, 4 when one fails.
 */
import { readFileSync } from 'node:fs';
import { verifyAudit } from '../../services/audit.js';
import { checkpointsIn, proveAgainstCheckpoints } from '../../store/checkpoint-proof.js';
import { findOrganisation } from '../../store/organisations.js';
import type { AuditRow } from '../../store/schema.js';
import { UsageError } from '../errors.js';
import { parseOptions, withDatabase } from '../shared.js';
import { VERIFY_USAGE } from '../usage.js';
import { DEFAULT_DATABASE_URL } from './keys.js';

/** Exit code when a verification ran and found the trail or a table not as recorded. */
export const EXIT_VERIFY_FAILED = 4;

export interface VerifyOutput {
  stdout: string;
  code: number;
}

const SPEC = {
  org: { type: 'string' },
  full: { type: 'boolean' },
  export: { type: 'string' },
  'public-key': { type: 'string' },
  checkpoints: { type: 'string' },
  help: { type: 'boolean', short: 'h' },
} as const;

export async function runVerify(args: readonly string[], env: NodeJS.ProcessEnv = process.env): Promise<VerifyOutput> {
  const { values, positionals } = parseOptions(args, SPEC, false);
  if (positionals.length > 0) throw new UsageError(`unexpected argument ${positionals[0]}`);
  if (values.help) return { stdout: VERIFY_USAGE, code: 0 };
  if (values.export !== undefined) return verifyExport(values);
  if (values.org === undefined)
    throw new UsageError('give --org ID (check the database) or --export FILE with --public-key and --checkpoints');
  return verifyDatabase(String(values.org), values.full === true, env.DATABASE_URL ?? DEFAULT_DATABASE_URL);
}

async function verifyDatabase(organisationId: string, full: boolean, databaseUrl: string): Promise<VerifyOutput> {
  return withDatabase(databaseUrl, async (store) => {
    if (!(await findOrganisation(store.db, organisationId)))
      throw new UsageError(`--org: no organisation ${organisationId} in ${store.location}`);
    const verdict = await verifyAudit(store.db, organisationId, full ? 'full' : 'chain');
    const lines = [
      verdict.broken
        ? `chain: BROKEN at row ${verdict.broken.seq}: ${verdict.broken.reason}`
        : `chain: intact, ${verdict.checked} rows, head ${verdict.headSeq} ${verdict.headHash}`,
      `frozen baselines: ${verdict.baselines.checked} checked, ${verdict.baselines.differences.length} not as frozen`,
      ...verdict.baselines.differences.map((d) => `  ${d.key}: ${d.difference}`),
      ...(verdict.replay
        ? [
            `tables against the trail: ${Object.entries(verdict.replay.compared)
              .map(([table, rows]) => `${table} ${rows}`)
              .join(', ')}; ${verdict.replay.differenceCount} differences`,
            ...verdict.replay.differences.map((d) => `  ${d.table} ${d.key}: ${d.difference}`),
          ]
        : []),
      verdict.ok ? 'verified' : 'NOT VERIFIED',
    ];
    return { stdout: `${lines.join('\n')}\n`, code: verdict.ok ? 0 : EXIT_VERIFY_FAILED };
  });
}

function readJson(option: string, path: string): unknown {
  let text: string;
  try {
    text = readFileSync(path, 'utf8');
  } catch (error) {
    throw new UsageError(`--${option}: cannot read ${path} (${(error as NodeJS.ErrnoException).code ?? 'error'})`);
  }
  try {
    return JSON.parse(text);
  } catch {
    throw new UsageError(`--${option}: ${path} is not JSON`);
  }
}

function verifyExport(values: Record<string, string | boolean | undefined>): VerifyOutput {
  const exportPath = String(values.export);
  if (values['public-key'] === undefined)
    throw new UsageError('--public-key FILE is required with --export (the service’s checkpoint public key, PEM)');
  if (values.checkpoints === undefined)
    throw new UsageError(
      '--checkpoints FILE is required with --export (a statement’s JSON copy, or the answer of GET /v1/audit/checkpoints)',
    );
  const document = readJson('export', exportPath) as {
    organisation?: { id?: unknown };
    tables?: { audit_log?: unknown };
  };
  const organisationId = document.organisation?.id;
  const rows = document.tables?.audit_log;
  if (typeof organisationId !== 'string' || !Array.isArray(rows))
    throw new UsageError(`--export: ${exportPath} is not an mvledger export`);
  const checkpoints = checkpointsIn(readJson('checkpoints', String(values.checkpoints)));
  if (checkpoints === null || checkpoints.length === 0)
    throw new UsageError(`--checkpoints: ${String(values.checkpoints)} holds no signed checkpoint`);
  let publicKeyPem: string;
  try {
    publicKeyPem = readFileSync(String(values['public-key']), 'utf8');
  } catch (error) {
    throw new UsageError(
      `--public-key: cannot read ${String(values['public-key'])} (${(error as NodeJS.ErrnoException).code ?? 'error'})`,
    );
  }
  const proof = proveAgainstCheckpoints(organisationId, rows as AuditRow[], checkpoints, publicKeyPem);
  const lines = [
    proof.chain.ok
      ? `chain: intact, ${proof.chain.checked} rows, head ${proof.chain.headSeq} ${proof.chain.headHash}`
      : `chain: BROKEN at row ${proof.chain.broken?.seq}: ${proof.chain.broken?.reason}`,
    ...proof.checkpoints.map(
      (c) => `checkpoint ${c.seq} (signed ${c.signedAt}, key ${c.keyId}): ${c.ok ? 'holds' : 'FAILS'}: ${c.finding}`,
    ),
    proof.ok ? 'verified' : 'NOT VERIFIED',
  ];
  return { stdout: `${lines.join('\n')}\n`, code: proof.ok ? 0 : EXIT_VERIFY_FAILED };
}
