/**
 * Issued savings statements: a savings report rendered once, at issue, and
 * kept byte for byte in every format with its content hashes and the audit
 * head it rests on; then approved or rejected by a second person (an
 * analyst who is not the preparer), and voided (and replaced) when needed.
 *
 * Every step is one transaction with its audit row, and stores a new copy
 * of the statement whose approval block shows the step: stored bytes are
 * never re-rendered or changed. `compareStatement` renders the same request
 * on today's data and lists what changed since issue.
 *
 * Errors go through `fail` below (one place to switch to a transport-free
 * domain error).
 */
import { canonicalJson } from '../lib/canonical-json.js';
import { DomainError, notFound, type FieldError } from '../domain/errors.js';
import { newId } from '../store/ids.js';
import { readSnapshot } from '../store/transactions.js';
import type { Kysely } from 'kysely';
import type { Database, StatementCopyKind, StatementCopyRow, StatementRow, StatementStatus } from '../store/schema.js';
import { compareReports, type StatementChange } from '../reports/statement/compare.js';
import {
  dataThrough,
  STATEMENT_FORMAT,
  STATEMENT_VERSION,
  textHash,
  type ContentHashes,
  type StatementDocument,
  type StatementRequest,
  type StatementStep,
  type StepActor,
} from '../reports/statement/statement-document.js';
import { renderStatementCsv, renderStatementHtml, renderStatementJson } from '../reports/statement/render-statement.js';
import type { SavingsReport } from '../reports/savings-report.js';
import { audit, inTransaction, type Executor, type ServiceContext, type Tx } from './context.js';
import type { SignedCheckpoint } from '../lib/checkpoint-signature.js';
import { signAuditHead } from './audit-checkpoints.js';
import { savingsReportIn, type ReportQuery } from './reports.js';

/** The errors of this module, in one place. */
const fail = {
  validation: (field: string, message: string) =>
    new DomainError('invalid', `${field}: ${message}`, [{ field, message }]),
  conflict: (detail: string, errors?: FieldError[]) => new DomainError('conflict', detail, errors),
  forbidden: (detail: string) => new DomainError('forbidden', detail),
  notFound: (id: string) => notFound('statement', id),
};

export type StatementWindow = { quarter: string } | { contractYear: number } | { from: string; to: string };

export interface IssueStatementInput {
  window: StatementWindow;
  facilityId?: string | null;
  confidence?: number | null;
  note?: string | null;
}

export type StatementFormat = 'json' | 'csv' | 'html';

/** The statement resource (the API's view of a row and its copies). */
export interface Statement {
  id: string;
  status: StatementStatus;
  window: StatementWindow & { from: string; to: string; kind: string; label: string };
  facilityId: string | null;
  confidence: number;
  note: string | null;
  auditHead: { seq: number; hash: string };
  reportHash: string;
  dataThrough: string | null;
  /** Of the current copy: what GET …/document returns by default. */
  contentHashes: ContentHashes;
  /** Every stored copy, oldest first: 1 is the issued copy. */
  copies: { copy: number; kind: StatementCopyKind; createdAt: string; contentHashes: ContentHashes }[];
  steps: StatementStep[];
  preparedBy: string;
  preparedAt: string;
  approvedBy: string | null;
  approvedAt: string | null;
  rejectedBy: string | null;
  rejectedAt: string | null;
  rejectionReason: string | null;
  voidedBy: string | null;
  voidedAt: string | null;
  voidReason: string | null;
  replacedBy: string | null;
}

function windowQuery(window: StatementWindow): Pick<ReportQuery, 'quarter' | 'contractYear' | 'from' | 'to'> {
  if ('quarter' in window) return { quarter: window.quarter };
  if ('contractYear' in window) return { contractYear: window.contractYear };
  return { from: window.from, to: window.to };
}

function reportQuery(request: StatementRequest): ReportQuery {
  return {
    ...windowQuery(request.window),
    ...(request.facilityId !== null ? { facilityId: request.facilityId } : {}),
    ...(request.confidence !== null ? { confidence: request.confidence } : {}),
  };
}

async function actor(db: Executor, organisationId: string, keyId: string): Promise<StepActor> {
  const key = await db
    .selectFrom('api_keys')
    .select(['id', 'name', 'role'])
    .where('id', '=', keyId)
    .where('organisation_id', '=', organisationId)
    .executeTakeFirst();
  return key ? { keyId: key.id, name: key.name, role: key.role } : { keyId, name: keyId, role: 'unknown' };
}

/** The steps so far, oldest first, from the row's columns and the keys' holders. */
async function stepsOf(db: Executor, row: StatementRow): Promise<StatementStep[]> {
  const org = row.organisation_id;
  const steps: StatementStep[] = [
    { step: 'prepared', by: await actor(db, org, row.prepared_by), at: row.prepared_at, reason: null },
  ];
  if (row.approved_by && row.approved_at)
    steps.push({ step: 'approved', by: await actor(db, org, row.approved_by), at: row.approved_at, reason: null });
  if (row.rejected_by && row.rejected_at)
    steps.push({
      step: 'rejected',
      by: await actor(db, org, row.rejected_by),
      at: row.rejected_at,
      reason: row.rejection_reason,
    });
  if (row.voided_by && row.voided_at)
    steps.push({
      step: 'voided',
      by: await actor(db, org, row.voided_by),
      at: row.voided_at,
      reason: row.void_reason,
      replacedBy: row.replaced_by,
    });
  return steps;
}

function hashesOf(copy: Pick<StatementCopyRow, 'json_hash' | 'csv_hash' | 'html_hash'>): ContentHashes {
  return { json: copy.json_hash, csv: copy.csv_hash, html: copy.html_hash };
}

async function copiesOf(
  db: Executor,
  statementId: string,
): Promise<Omit<StatementCopyRow, 'json_body' | 'csv_body' | 'html_body'>[]> {
  return db
    .selectFrom('statement_copies')
    .select(['statement_id', 'copy', 'organisation_id', 'kind', 'created_at', 'json_hash', 'csv_hash', 'html_hash'])
    .where('statement_id', '=', statementId)
    .orderBy('copy')
    .execute();
}

async function toStatement(db: Executor, row: StatementRow): Promise<Statement> {
  const request = JSON.parse(row.request_json) as StatementRequest;
  const copies = await copiesOf(db, row.id);
  const current = copies[copies.length - 1]!;
  return {
    id: row.id,
    status: row.status,
    window: {
      ...request.window,
      from: row.window_from,
      to: row.window_to,
      kind: row.window_kind,
      label: row.window_label,
    },
    facilityId: row.facility_id,
    confidence: row.confidence,
    note: row.note,
    auditHead: { seq: row.audit_seq, hash: row.audit_hash },
    reportHash: row.report_hash,
    dataThrough: row.data_through,
    contentHashes: hashesOf(current),
    copies: copies.map((c) => ({ copy: c.copy, kind: c.kind, createdAt: c.created_at, contentHashes: hashesOf(c) })),
    steps: await stepsOf(db, row),
    preparedBy: row.prepared_by,
    preparedAt: row.prepared_at,
    approvedBy: row.approved_by,
    approvedAt: row.approved_at,
    rejectedBy: row.rejected_by,
    rejectedAt: row.rejected_at,
    rejectionReason: row.rejection_reason,
    voidedBy: row.voided_by,
    voidedAt: row.voided_at,
    voidReason: row.void_reason,
    replacedBy: row.replaced_by,
  };
}

async function statementRow(db: Executor, organisationId: string, id: string): Promise<StatementRow> {
  const row = await db
    .selectFrom('statements')
    .selectAll()
    .where('id', '=', id)
    .where('organisation_id', '=', organisationId)
    .executeTakeFirst();
  if (!row) throw fail.notFound(id);
  return row;
}

/** Render a copy in every format and store it; its hashes are returned for the audit row. */
async function storeCopy(
  trx: Tx,
  row: StatementRow,
  kind: StatementCopyKind,
  copy: number,
  report: SavingsReport,
  issuedCopy: ContentHashes | null,
  at: string,
  checkpoint?: SignedCheckpoint,
): Promise<ContentHashes> {
  const document: StatementDocument = {
    format: STATEMENT_FORMAT,
    version: STATEMENT_VERSION,
    statement: {
      id: row.id,
      copy,
      copyKind: kind,
      status: row.status,
      issuedAt: row.prepared_at,
      dataThrough: row.data_through,
      note: row.note,
      request: JSON.parse(row.request_json) as StatementRequest,
      steps: await stepsOf(trx, row),
      issuedCopy,
      ...(checkpoint ? { checkpoint: signedPart(checkpoint) } : {}),
    },
    report,
  };
  const json = renderStatementJson(document);
  const csv = renderStatementCsv(document);
  const html = renderStatementHtml(document);
  const hashes = { json: textHash(json), csv: textHash(csv), html: textHash(html) };
  await trx
    .insertInto('statement_copies')
    .values({
      statement_id: row.id,
      copy,
      organisation_id: row.organisation_id,
      kind,
      created_at: at,
      json_body: json,
      csv_body: csv,
      html_body: html,
      json_hash: hashes.json,
      csv_hash: hashes.csv,
      html_hash: hashes.html,
    })
    .execute();
  return hashes;
}

/** The report stored in the issued copy (copy 1): every later copy carries the same report. */
async function issuedReport(
  db: Executor,
  statementId: string,
): Promise<{ report: SavingsReport; hashes: ContentHashes; checkpoint: SignedCheckpoint | undefined }> {
  const copy = await db
    .selectFrom('statement_copies')
    .select(['json_body', 'json_hash', 'csv_hash', 'html_hash'])
    .where('statement_id', '=', statementId)
    .where('copy', '=', 1)
    .executeTakeFirstOrThrow();
  const document = JSON.parse(copy.json_body) as StatementDocument;
  return { report: document.report, hashes: hashesOf(copy), checkpoint: document.statement.checkpoint };
}

/** The checkpoint as a statement carries it: the claim, the key and the signature (not why it was made). */
function signedPart(checkpoint: SignedCheckpoint): SignedCheckpoint {
  const { organisationId, seq, headHash, signedAt, keyId, signature } = checkpoint;
  return { organisationId, seq, headHash, signedAt, keyId, signature };
}

/**
 * Issue a statement: render the report once on the data as it stands, in
 * the same transaction that stores its bytes and its audit row. Refused
 * (nothing stored) when the window is malformed or holds no reporting data.
 */
export async function issueStatement(ctx: ServiceContext, input: IssueStatementInput): Promise<Statement> {
  const organisationId = ctx.principal.organisationId;
  const request: StatementRequest = {
    window: input.window,
    facilityId: input.facilityId ?? null,
    confidence: input.confidence ?? null,
  };
  return inTransaction(ctx, async (trx) => {
    const report = await savingsReportIn(trx, organisationId, reportQuery(request));
    const row: StatementRow = {
      id: newId('stm'),
      organisation_id: organisationId,
      status: 'prepared',
      request_json: canonicalJson(request),
      window_from: report.window.from,
      window_to: report.window.to,
      window_kind: report.window.kind,
      window_label: report.window.label,
      facility_id: request.facilityId,
      confidence: report.confidence,
      note: input.note ?? null,
      audit_seq: report.dataAsOf.auditSeq,
      audit_hash: report.dataAsOf.auditHash,
      report_hash: report.contentHash,
      data_through: dataThrough(report),
      prepared_by: ctx.principal.keyId,
      prepared_at: ctx.now,
      approved_by: null,
      approved_at: null,
      rejected_by: null,
      rejected_at: null,
      rejection_reason: null,
      voided_by: null,
      voided_at: null,
      void_reason: null,
      replaced_by: null,
    };
    await trx.insertInto('statements').values(row).execute();
    // The copy carries a signed checkpoint of the very head its figures were read at.
    const checkpoint = ctx.checkpointSigner
      ? await signAuditHead(trx, ctx.checkpointSigner, organisationId, ctx.now, 'statement')
      : undefined;
    const hashes = await storeCopy(trx, row, 'issued', 1, report, null, ctx.now, checkpoint);
    await audit(trx, ctx, {
      action: 'issue-statement',
      entityType: 'statement',
      entityId: row.id,
      before: null,
      after: {
        status: row.status,
        request,
        reportHash: row.report_hash,
        auditHead: { seq: row.audit_seq, hash: row.audit_hash },
        copy: 1,
        contentHashes: hashes,
      },
    });
    // And the head that records the issue is signed too: the filed copy's hashes are then under a signature.
    if (ctx.checkpointSigner) await signAuditHead(trx, ctx.checkpointSigner, organisationId, ctx.now, 'statement');
    return toStatement(trx, row);
  });
}

export async function listStatements(db: Executor, organisationId: string): Promise<{ statements: Statement[] }> {
  const rows = await db
    .selectFrom('statements')
    .selectAll()
    .where('organisation_id', '=', organisationId)
    .orderBy('prepared_at', 'desc')
    .orderBy('id', 'desc')
    .execute();
  const statements: Statement[] = [];
  for (const row of rows) statements.push(await toStatement(db, row));
  return { statements };
}

export async function getStatement(db: Executor, organisationId: string, id: string): Promise<Statement> {
  return toStatement(db, await statementRow(db, organisationId, id));
}

/** The stored bytes of a copy (the current one unless `copy` names another), never a re-render. */
export async function statementDocument(
  db: Executor,
  organisationId: string,
  id: string,
  format: StatementFormat,
  copy?: number,
): Promise<{ body: string; contentHash: string; copy: number; kind: StatementCopyKind }> {
  await statementRow(db, organisationId, id);
  let query = db.selectFrom('statement_copies').selectAll().where('statement_id', '=', id);
  query = copy === undefined ? query.orderBy('copy', 'desc').limit(1) : query.where('copy', '=', copy);
  const row = await query.executeTakeFirst();
  if (!row) throw new DomainError('not-found', `statement ${id} has no copy ${copy}`);
  const body = format === 'json' ? row.json_body : format === 'csv' ? row.csv_body : row.html_body;
  const contentHash = format === 'json' ? row.json_hash : format === 'csv' ? row.csv_hash : row.html_hash;
  return { body, contentHash, copy: row.copy, kind: row.kind };
}

/** A step by a second person: never the preparer's key, nor another key of the same holder's name. */
async function refuseOwnStatement(trx: Tx, ctx: ServiceContext, row: StatementRow, what: string): Promise<void> {
  const me = await actor(trx, row.organisation_id, ctx.principal.keyId);
  const preparer = await actor(trx, row.organisation_id, row.prepared_by);
  if (me.keyId === preparer.keyId || me.name.trim().toLowerCase() === preparer.name.trim().toLowerCase()) {
    throw fail.forbidden(
      `statement ${row.id} was prepared by ${preparer.name} (key ${preparer.keyId}): its preparer may not ${what} it; a second person (an analyst) must`,
    );
  }
}

function refuseUnlessPrepared(row: StatementRow, what: string): void {
  if (row.status !== 'prepared') {
    const since = {
      approved: row.approved_at,
      rejected: row.rejected_at,
      voided: row.voided_at,
      prepared: row.prepared_at,
    }[row.status];
    throw fail.conflict(
      `statement ${row.id} is ${row.status} (since ${since}): only a prepared statement can be ${what}`,
      [{ field: 'status', message: `is ${row.status}` }],
    );
  }
}

/** Apply one workflow step: update the row, store the new copy, append the audit row. */
async function step(
  ctx: ServiceContext,
  id: string,
  action: string,
  kind: StatementCopyKind,
  check: (trx: Tx, row: StatementRow) => Promise<Partial<StatementRow>>,
): Promise<Statement> {
  const organisationId = ctx.principal.organisationId;
  return inTransaction(ctx, async (trx) => {
    const before = await statementRow(trx, organisationId, id);
    const changes = await check(trx, before);
    const row: StatementRow = { ...before, ...changes };
    await trx.updateTable('statements').set(changes).where('id', '=', id).execute();
    const last = await trx
      .selectFrom('statement_copies')
      .select((eb) => eb.fn.max('copy').as('copy'))
      .where('statement_id', '=', id)
      .executeTakeFirstOrThrow();
    const issued = await issuedReport(trx, id);
    const copy = Number(last.copy) + 1;
    const hashes = await storeCopy(trx, row, kind, copy, issued.report, issued.hashes, ctx.now, issued.checkpoint);
    await audit(trx, ctx, {
      action,
      entityType: 'statement',
      entityId: id,
      before: { status: before.status },
      after: { status: row.status, ...changes, copy, contentHashes: hashes, issuedCopy: issued.hashes },
    });
    return toStatement(trx, row);
  });
}

export function approveStatement(ctx: ServiceContext, id: string): Promise<Statement> {
  return step(ctx, id, 'approve-statement', 'approved', async (trx, row) => {
    refuseUnlessPrepared(row, 'approved');
    await refuseOwnStatement(trx, ctx, row, 'approve');
    return { status: 'approved', approved_by: ctx.principal.keyId, approved_at: ctx.now };
  });
}

export function rejectStatement(ctx: ServiceContext, id: string, input: { reason: string }): Promise<Statement> {
  return step(ctx, id, 'reject-statement', 'rejected', async (trx, row) => {
    refuseUnlessPrepared(row, 'rejected');
    await refuseOwnStatement(trx, ctx, row, 'reject');
    return {
      status: 'rejected',
      rejected_by: ctx.principal.keyId,
      rejected_at: ctx.now,
      rejection_reason: input.reason,
    };
  });
}

export function voidStatement(
  ctx: ServiceContext,
  id: string,
  input: { reason: string; replacedBy?: string | null },
): Promise<Statement> {
  return step(ctx, id, 'void-statement', 'voided', async (trx, row) => {
    if (row.status === 'voided')
      throw fail.conflict(`statement ${row.id} is already voided (since ${row.voided_at})`, [
        { field: 'status', message: 'is voided' },
      ]);
    if (row.status === 'rejected')
      throw fail.conflict(
        `statement ${row.id} was rejected (since ${row.rejected_at}): a rejected statement is not in force and needs no voiding`,
        [{ field: 'status', message: 'is rejected' }],
      );
    const replacedBy = input.replacedBy ?? null;
    if (replacedBy !== null) {
      if (replacedBy === row.id) throw fail.validation('replacedBy', 'a statement cannot replace itself');
      const replacement = await trx
        .selectFrom('statements')
        .select(['id', 'status'])
        .where('id', '=', replacedBy)
        .where('organisation_id', '=', row.organisation_id)
        .executeTakeFirst();
      if (!replacement) throw fail.validation('replacedBy', `no statement ${replacedBy} in this organisation`);
      if (replacement.status === 'voided' || replacement.status === 'rejected')
        throw fail.validation(
          'replacedBy',
          `statement ${replacedBy} is ${replacement.status}: it cannot replace another`,
        );
    }
    return {
      status: 'voided',
      voided_by: ctx.principal.keyId,
      voided_at: ctx.now,
      void_reason: input.reason,
      replaced_by: replacedBy,
    };
  });
}

export interface StatementComparison {
  statementId: string;
  issued: { reportHash: string; auditHead: { seq: number; hash: string }; dataThrough: string | null };
  /** The same request on today's data; null when it can no longer be rendered (see problem). */
  today: { reportHash: string; auditHead: { seq: number; hash: string }; dataThrough: string | null } | null;
  /** Why today's rendering failed, in words; null when it rendered. */
  problem: string | null;
  unchanged: boolean;
  changes: StatementChange[];
  /** Audit entries since the statement's audit head, other than statements' own steps: who changed what, and when. */
  auditSince: { seq: number; at: string; actor: string; action: string; entityType: string; entityId: string }[];
}

/** The audit entries listed at most by compare (the rest are counted in the audit trail itself). */
const AUDIT_SINCE_LIMIT = 200;

/** Render the statement's request on today's data and list what changed since issue. */
export async function compareStatement(
  db: Kysely<Database>,
  organisationId: string,
  id: string,
): Promise<StatementComparison> {
  return readSnapshot(db, async (trx) => {
    const row = await statementRow(trx, organisationId, id);
    const issued = await issuedReport(trx, id);
    const request = JSON.parse(row.request_json) as StatementRequest;
    let today: SavingsReport | null = null;
    let problem: string | null = null;
    try {
      today = await savingsReportIn(trx, organisationId, reportQuery(request));
    } catch (error) {
      if (!(error instanceof DomainError)) throw error;
      problem = error.message;
    }
    const auditRows = await trx
      .selectFrom('audit_log')
      .select(['seq', 'at', 'actor', 'action', 'entity_type', 'entity_id'])
      .where('organisation_id', '=', organisationId)
      .where('seq', '>', row.audit_seq)
      .where('entity_type', '!=', 'statement')
      .orderBy('seq')
      .limit(AUDIT_SINCE_LIMIT)
      .execute();
    const changes = today ? compareReports(issued.report, today) : [];
    return {
      statementId: id,
      issued: {
        reportHash: row.report_hash,
        auditHead: { seq: row.audit_seq, hash: row.audit_hash },
        dataThrough: row.data_through,
      },
      today: today
        ? {
            reportHash: today.contentHash,
            auditHead: { seq: today.dataAsOf.auditSeq, hash: today.dataAsOf.auditHash },
            dataThrough: dataThrough(today),
          }
        : null,
      problem,
      unchanged: today !== null && changes.length === 0,
      changes,
      auditSince: auditRows.map((r) => ({
        seq: r.seq,
        at: r.at,
        actor: r.actor,
        action: r.action,
        entityType: r.entity_type,
        entityId: r.entity_id,
      })),
    };
  });
}
