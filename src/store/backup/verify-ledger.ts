/**
 * A ledger checked whole: every organisation's audit chain and every frozen
 * or superseded baseline's content hash, and the verdict in words.
 */
import type { Kysely } from 'kysely';
import { verifyAllAuditChains } from '../audit.js';
import { verifyBaselineContent } from '../baseline-content.js';
import type { Database } from '../schema.js';

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
