/**
 * The audit trail: every write appends one row in the same transaction,
 * recording who, when, what, and the entity before and after. Each
 * organisation has its own chain, numbered 1, 2, 3, …: hash =
 * SHA-256(prev_hash + "\n" + canonical JSON of the row), so editing or
 * deleting a row breaks the chain at that point, and an organisation's chain
 * can be exported, moved and verified on its own. (Cutting rows off the end
 * leaves a shorter valid chain: keep the reported head hash outside the
 * database to detect that.) Appends are serialised per organisation by the
 * write transaction (store/transactions.ts).
 */
import { canonicalJson, sha256Hex } from '../lib/canonical-json.js';
import type { AuditRow } from './schema.js';
import type { Executor } from './executor.js';

export const GENESIS_HASH = '0'.repeat(64);

export interface AuditEntry {
  organisationId: string;
  /** API key id, or "system". */
  actor: string;
  at: string;
  action: string;
  entityType: string;
  entityId: string;
  before?: unknown;
  after?: unknown;
}

function rowDigest(prevHash: string, row: Omit<AuditRow, 'hash' | 'prev_hash'>): string {
  return sha256Hex(
    `${prevHash}\n${canonicalJson({
      seq: row.seq,
      organisation_id: row.organisation_id,
      actor: row.actor,
      at: row.at,
      action: row.action,
      entity_type: row.entity_type,
      entity_id: row.entity_id,
      before_json: row.before_json,
      after_json: row.after_json,
    })}`,
  );
}

/** Append one entry; call inside the transaction that makes the change. */
export async function appendAudit(trx: Executor, entry: AuditEntry): Promise<AuditRow> {
  const last = await trx
    .selectFrom('audit_log')
    .select(['seq', 'hash'])
    .where('organisation_id', '=', entry.organisationId)
    .orderBy('seq', 'desc')
    .limit(1)
    .executeTakeFirst();
  const base = {
    seq: (last?.seq ?? 0) + 1,
    organisation_id: entry.organisationId,
    actor: entry.actor,
    at: entry.at,
    action: entry.action,
    entity_type: entry.entityType,
    entity_id: entry.entityId,
    before_json: entry.before === undefined ? null : canonicalJson(entry.before),
    after_json: entry.after === undefined ? null : canonicalJson(entry.after),
  };
  const prevHash = last?.hash ?? GENESIS_HASH;
  const row: AuditRow = { ...base, prev_hash: prevHash, hash: rowDigest(prevHash, base) };
  await trx.insertInto('audit_log').values(row).execute();
  return row;
}

export interface ChainVerdict {
  ok: boolean;
  /** Rows checked. */
  checked: number;
  /** Hash of the last row: record it elsewhere to detect a cut-off tail later. */
  headHash: string;
  headSeq: number;
  /** First row where the chain breaks, and why. */
  broken?: { organisationId: string; seq: number; reason: string };
}

/** Why `row` cannot follow a chain whose last row is `expectedSeq - 1` with hash `prevHash`; null when it can. */
function auditRowFault(row: AuditRow, expectedSeq: number, prevHash: string): string | null {
  if (row.seq !== expectedSeq) return `row ${expectedSeq} is missing (next row is ${row.seq})`;
  if (row.prev_hash !== prevHash) return 'its previous-hash does not match the row before it';
  if (rowDigest(prevHash, row) !== row.hash) return 'its content does not match its hash (the row was edited)';
  return null;
}

/**
 * The same walk over rows held in memory (an export file's audit_log), in
 * the order given, which must be sequence order. A row of another
 * organisation breaks the chain.
 */
export function verifyAuditRows(organisationId: string, rows: Iterable<AuditRow>): ChainVerdict {
  let expectedSeq = 1;
  let prevHash = GENESIS_HASH;
  let checked = 0;
  for (const row of rows) {
    const reason =
      row.organisation_id !== organisationId
        ? `it belongs to organisation ${row.organisation_id}`
        : auditRowFault(row, expectedSeq, prevHash);
    if (reason !== null)
      return {
        ok: false,
        checked,
        headHash: prevHash,
        headSeq: expectedSeq - 1,
        broken: { organisationId, seq: row.seq, reason },
      };
    prevHash = row.hash;
    expectedSeq++;
    checked++;
  }
  return { ok: true, checked, headHash: prevHash, headSeq: expectedSeq - 1 };
}

/** Walk one organisation's chain in sequence order, a page at a time. */
export async function verifyAuditChain(db: Executor, organisationId: string, pageSize = 2000): Promise<ChainVerdict> {
  let expectedSeq = 1;
  let prevHash = GENESIS_HASH;
  let checked = 0;
  for (;;) {
    const page = await db
      .selectFrom('audit_log')
      .selectAll()
      .where('organisation_id', '=', organisationId)
      .where('seq', '>=', expectedSeq)
      .orderBy('seq')
      .limit(pageSize)
      .execute();
    for (const row of page) {
      const reason = auditRowFault(row, expectedSeq, prevHash);
      if (reason !== null)
        return {
          ok: false,
          checked,
          headHash: prevHash,
          headSeq: expectedSeq - 1,
          broken: { organisationId, seq: row.seq, reason },
        };
      prevHash = row.hash;
      expectedSeq++;
      checked++;
    }
    if (page.length < pageSize) break;
  }
  return { ok: true, checked, headHash: prevHash, headSeq: expectedSeq - 1 };
}

/** Every organisation's chain; the first break found is reported. */
export async function verifyAllAuditChains(
  db: Executor,
): Promise<{ ok: boolean; chains: number; checked: number; broken?: ChainVerdict['broken'] }> {
  const organisations = await db.selectFrom('organisations').select('id').orderBy('id').execute();
  let checked = 0;
  for (const { id } of organisations) {
    const verdict = await verifyAuditChain(db, id);
    checked += verdict.checked;
    if (!verdict.ok)
      return {
        ok: false,
        chains: organisations.length,
        checked,
        ...(verdict.broken ? { broken: verdict.broken } : {}),
      };
  }
  return { ok: true, chains: organisations.length, checked };
}

export interface AuditQuery {
  organisationId: string;
  entityType?: string;
  /** Only rows of these actions (how readings, rates, contracts... are found under the entity they are filed with). */
  actions?: readonly string[];
  entityId?: string;
  since?: string;
  limit: number;
  afterSeq?: number;
}

export async function listAudit(db: Executor, query: AuditQuery): Promise<AuditRow[]> {
  let q = db.selectFrom('audit_log').selectAll().where('organisation_id', '=', query.organisationId);
  if (query.entityType) q = q.where('entity_type', '=', query.entityType);
  if (query.actions && query.actions.length > 0) q = q.where('action', 'in', [...query.actions]);
  if (query.entityId) q = q.where('entity_id', '=', query.entityId);
  if (query.since) q = q.where('at', '>=', query.since);
  if (query.afterSeq !== undefined) q = q.where('seq', '>', query.afterSeq);
  return q.orderBy('seq').limit(query.limit).execute();
}
