/**
 * The outsider's proof: with an organisation's export (its audit rows), the
 * service's public key and signed checkpoints (from a filed statement or the
 * checkpoint list), show that the trail up to each checkpoint is the one the
 * service signed. A rewritten trail (rows edited and every later hash
 * recomputed) verifies as a chain but gives another hash at the checkpoint's
 * row; a cut trail has no row there. Needs no database and no secret.
 */
import { checkpointSignatureFault, type SignedCheckpoint } from '../lib/checkpoint-signature.js';
import { verifyAuditRows, type ChainVerdict } from './audit.js';
import type { AuditRow } from './schema.js';

export interface CheckpointFinding {
  seq: number;
  signedAt: string;
  keyId: string;
  ok: boolean;
  /** What holds, or why it does not. */
  finding: string;
}

export interface CheckpointProof {
  ok: boolean;
  chain: ChainVerdict;
  checkpoints: CheckpointFinding[];
}

/** Check the export's chain and each checkpoint against it and the public key. */
export function proveAgainstCheckpoints(
  organisationId: string,
  auditRows: readonly AuditRow[],
  checkpoints: readonly SignedCheckpoint[],
  publicKeyPem: string,
): CheckpointProof {
  const ordered = [...auditRows].sort((a, b) => a.seq - b.seq);
  const chain = verifyAuditRows(organisationId, ordered);
  const bySeq = new Map(ordered.map((row) => [row.seq, row]));
  const findings = checkpoints.map((checkpoint): CheckpointFinding => {
    const base = { seq: checkpoint.seq, signedAt: checkpoint.signedAt, keyId: checkpoint.keyId };
    const fail = (finding: string) => ({ ...base, ok: false, finding });
    if (checkpoint.organisationId !== organisationId)
      return fail(`it is a checkpoint of organisation ${checkpoint.organisationId}`);
    const signatureFault = checkpointSignatureFault(checkpoint, publicKeyPem);
    if (signatureFault !== null) return fail(`not signed by this key: ${signatureFault}`);
    const row = bySeq.get(checkpoint.seq);
    if (!row) return fail(`the trail has no row ${checkpoint.seq}: it was cut after row ${chain.headSeq}`);
    if (row.hash !== checkpoint.headHash)
      return fail(
        `row ${checkpoint.seq} has hash ${row.hash}, not the signed ${checkpoint.headHash}: the trail was rewritten`,
      );
    if (!chain.ok && chain.broken && chain.broken.seq <= checkpoint.seq)
      return fail(`the chain breaks at row ${chain.broken.seq}, before the checkpoint: ${chain.broken.reason}`);
    return { ...base, ok: true, finding: `rows 1 to ${checkpoint.seq} are the trail the service signed` };
  });
  return { ok: chain.ok && findings.every((f) => f.ok), chain, checkpoints: findings };
}

/**
 * Checkpoints from a file an auditor holds: the checkpoint list the API
 * answers ({ checkpoints: [...] }), a statement's JSON copy
 * ({ statement: { checkpoint } }), an array of checkpoints or a single one.
 * Returns null when the value holds none of these.
 */
export function checkpointsIn(value: unknown): SignedCheckpoint[] | null {
  const isCheckpoint = (v: unknown): v is SignedCheckpoint =>
    v !== null &&
    typeof v === 'object' &&
    ['organisationId', 'headHash', 'signedAt', 'keyId', 'signature'].every(
      (k) => typeof (v as Record<string, unknown>)[k] === 'string',
    ) &&
    Number.isSafeInteger((v as Record<string, unknown>).seq);
  if (Array.isArray(value)) return value.every(isCheckpoint) ? value : null;
  if (isCheckpoint(value)) return [value];
  if (value !== null && typeof value === 'object') {
    const record = value as Record<string, unknown>;
    if (Array.isArray(record.checkpoints)) return checkpointsIn(record.checkpoints);
    const statement = record.statement as Record<string, unknown> | undefined;
    if (statement && typeof statement === 'object' && isCheckpoint(statement.checkpoint)) return [statement.checkpoint];
  }
  return null;
}
