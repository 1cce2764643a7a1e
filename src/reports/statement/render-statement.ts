/**
 * A statement in its three stored formats. Pure functions of the statement
 * document: the same copy always renders to the same bytes.
 *
 * - JSON: the document, two-space indented.
 * - CSV: the report's own table with the statement's rows first
 *   (record = statement, statement-step), in the report's columns.
 * - HTML: the statement head (identification, issue and data-through dates,
 *   the approval block) before the report, with a print layout of its own:
 *   a running header naming the statement and its status on every page, and
 *   "Page N of M" at the foot (CSS paged media margin boxes).
 */
import { renderReportCsv, csvText } from '../csv.js';
import { htmlDocument } from '../html/document.js';
import { renderReportMain } from '../html/render-report.js';
import { code, facts, tag, text } from '../html/markup.js';
import { shapeName } from '../shape-names.js';
import type { StatementDocument, StatementStep } from './statement-document.js';
import type { SignedCheckpoint } from '../../lib/checkpoint-signature.js';

const STEP_WORDS: Record<StatementStep['step'], string> = {
  prepared: 'Prepared',
  approved: 'Approved',
  rejected: 'Rejected',
  voided: 'Voided',
};

/** What the running header says of the copy's status. */
export function statusWords(document: StatementDocument): string {
  switch (document.statement.status) {
    case 'prepared':
      return 'AWAITING APPROVAL: not for payment';
    case 'approved':
      return 'APPROVED';
    case 'rejected':
      return 'REJECTED: not for payment';
    case 'voided':
      return 'VOID: not for payment';
  }
}

export function renderStatementJson(document: StatementDocument): string {
  return `${JSON.stringify(document, null, 2)}\n`;
}

/** The statement's title, also the HTML document's title. */
export function statementTitle(document: StatementDocument): string {
  return `Savings statement ${document.statement.id}: ${document.report.organisation.name}, ${document.report.window.label}`;
}

function utc(at: string): string {
  // Stored times are ISO 8601 in UTC: shown to the second, marked UTC.
  return `${at.slice(0, 10)} ${at.slice(11, 19)} UTC`;
}

/** A checkpoint in words, with everything an auditor needs to check its signature. */
function checkpointWords(checkpoint: SignedCheckpoint): string {
  return `audit checkpoint: sequence ${checkpoint.seq} hash ${checkpoint.headHash} signed ${utc(checkpoint.signedAt)} by key ${checkpoint.keyId}, Ed25519 signature ${checkpoint.signature}`;
}

function stepLine(step: StatementStep): string {
  const reason = step.reason === null ? '' : `; reason: ${step.reason}`;
  const replaced = step.replacedBy ? `; replaced by ${step.replacedBy}` : '';
  return `${STEP_WORDS[step.step]} by ${step.by.name} (${step.by.role}, key ${step.by.keyId}) at ${utc(step.at)}${reason}${replaced}`;
}

// ---------------------------------------------------------------------------
// CSV

/**
 * The report's CSV with the statement's rows after its header line. The
 * columns are read from the report's own header, so the statement rows stay
 * in step with whatever columns the report carries.
 */
export function renderStatementCsv(document: StatementDocument): string {
  const reportCsv = renderReportCsv(document.report);
  const firstBreak = reportCsv.indexOf('\r\n');
  const header = reportCsv.slice(0, firstBreak);
  const columns = header.split(',');
  const row = (values: Record<string, string>) => columns.map((column) => csvText(values[column] ?? '')).join(',');
  const s = document.statement;
  const rows = [
    row({
      record: 'statement',
      start: document.report.window.from,
      end: document.report.window.to,
      note: [
        `statement ${s.id} copy ${s.copy} (${s.copyKind}), status ${s.status}: ${statusWords(document)}`,
        `issued ${utc(s.issuedAt)}`,
        `data through ${s.dataThrough ?? 'no reporting data'}`,
        `report content hash ${document.report.contentHash}`,
        `audit head ${document.report.dataAsOf.auditSeq} ${document.report.dataAsOf.auditHash}`,
        ...(s.issuedCopy ? [`issued copy hashes json ${s.issuedCopy.json} csv ${s.issuedCopy.csv} html ${s.issuedCopy.html}`] : []),
        ...(s.checkpoint ? [checkpointWords(s.checkpoint)] : []),
        ...(s.note ? [`note: ${s.note}`] : []),
      ].join('; '),
    }),
    ...s.steps.map((step) => row({ record: 'statement-step', note: stepLine(step) })),
    ...(s.status === 'prepared' ? [row({ record: 'statement-step', note: 'Approval: awaiting (not yet approved by an analyst)' })] : []),
  ];
  return `${header}\r\n${rows.join('\r\n')}\r\n${reportCsv.slice(firstBreak + 2)}`;
}

// ---------------------------------------------------------------------------
// HTML

/** A CSS string literal: every character outside a plain set as a six-digit escape, so nothing can close the rule or the style element. */
export function cssString(value: string): string {
  let out = '"';
  for (const ch of value) {
    out += /^[A-Za-z0-9 .,:;_()/#-]$/.test(ch) ? ch : `\\${ch.codePointAt(0)!.toString(16).padStart(6, '0')}`;
  }
  return `${out}"`;
}

/** The print layout of a statement: running header and page numbers in the page margins. */
export function statementPrintCss(document: StatementDocument): string {
  const header = `Savings statement ${document.statement.id} · ${document.report.organisation.name} · ${document.report.window.label}`;
  return `
@page {
  @top-left { content: ${cssString(header)}; font: 7.5pt system-ui, sans-serif; color: #475569; }
  @top-right { content: ${cssString(statusWords(document))}; font: 600 7.5pt system-ui, sans-serif; color: #0f172a; }
  @bottom-left { content: ${cssString(`Issued ${utc(document.statement.issuedAt)}; report content hash ${document.report.contentHash.slice(0, 16)}…`)}; font: 7pt system-ui, sans-serif; color: #475569; }
  @bottom-right { content: "Page " counter(page) " of " counter(pages); font: 7.5pt system-ui, sans-serif; color: #0f172a; }
}
header.statement { border: 2px solid var(--ink); padding: 10px 14px; margin: 0 0 18px; }
header.statement h1 { font-size: 17pt; }
.statement-status { font-weight: 700; letter-spacing: 0.04em; }
.statement-status.voided, .statement-status.rejected { color: var(--bad); }
.statement-status.prepared { color: var(--warn); }
.statement-status.approved { color: var(--good); }
table.approval { width: 100%; }
section.approval { break-inside: avoid; page-break-inside: avoid; }
.void-banner { margin: 10px 0; padding: 8px 12px; border: 2px solid var(--bad); color: var(--bad); font-weight: 700; }
@media print { header.statement { break-after: avoid; } }
`;
}

function approvalBlock(document: StatementDocument): string {
  const s = document.statement;
  const row = (cells: string[]) => tag('tr', {}, cells.join(''));
  const cell = (value: string) => tag('td', {}, text(value));
  const rows = s.steps.map((step) =>
    tag(
      'tr',
      { 'data-step': step.step },
      [
        cell(STEP_WORDS[step.step]),
        cell(step.by.name),
        cell(step.by.role),
        tag('td', {}, code(step.by.keyId)),
        cell(utc(step.at)),
        cell([step.reason ?? '', step.replacedBy ? `replaced by ${step.replacedBy}` : ''].filter(Boolean).join('; ')),
      ].join(''),
    ),
  );
  if (s.status === 'prepared')
    rows.push(
      tag(
        'tr',
        { 'data-step': 'awaiting-approval' },
        [cell('Approval'), cell('awaiting approval by an analyst other than the preparer'), cell(''), cell(''), cell(''), cell('')].join(
          '',
        ),
      ),
    );
  const head = row(['Step', 'Name', 'Role', 'Key', 'Time (UTC)', 'Reason'].map((h) => tag('th', { scope: 'col' }, text(h))));
  return tag(
    'section',
    { class: 'approval', id: 'approval', 'aria-label': 'Approval' },
    `${tag('h2', {}, text('Approval'))}${tag('table', { class: 'approval' }, `${tag('thead', {}, head)}${tag('tbody', {}, rows.join(''))}`)}`,
  );
}

function statementHead(document: StatementDocument): string {
  const s = document.statement;
  const r = document.report;
  const window = 'quarter' in s.request.window ? `quarter ${s.request.window.quarter}` : r.window.label;
  const contracts = r.facilities.filter((f) => f.contract !== null);
  const contractFacts: [string, string][] = contracts.map((f) => {
    const c = f.contract!;
    const parties = (c.parties ?? []).map((p) => `${p.name} (${p.role})`).join('; ');
    const plan = c.mvPlanReference ? `M&V plan ${c.mvPlanReference}` : 'M&V plan not stated';
    const option = c.mvOption ? `, IPMVP option ${c.mvOption}` : '';
    return [
      `Contract of ${f.name}`,
      text(`${c.reference ?? 'reference not stated'}; ${plan}${option}${parties ? `; parties: ${parties}` : ''}`),
    ];
  });
  const shapes = [...new Set(r.facilities.flatMap((f) => f.meters.flatMap((m) => (m.baseline ? [m.baseline.model] : []))))].sort();
  const body = [
    tag('h1', {}, text('Savings statement')),
    tag(
      'p',
      { class: `statement-status ${s.status}`, 'data-statement-status': s.status },
      text(`${statusWords(document)} (copy ${s.copy}: ${s.copyKind})`),
    ),
    ...(s.status === 'voided'
      ? [tag('div', { class: 'void-banner' }, text('This statement is void. It must not be used for payment.'))]
      : []),
    facts([
      ['Statement', code(s.id)],
      ['Organisation', text(r.organisation.name)],
      ['Window', text(`${window}: ${r.window.from} to ${r.window.to} (end exclusive)`)],
      ['Issue date', text(utc(s.issuedAt))],
      ['Data through', text(s.dataThrough ?? 'no reporting data')],
      ['Data as of', text(`audit sequence ${r.dataAsOf.auditSeq}`)],
      ...contractFacts,
      ['Confidence of every ±', text(`${Math.round(r.confidence * 100)}% two-sided; the Guideline 14 significance verdict at 68%`)],
      ['Models', text(shapes.length === 0 ? 'none' : shapes.map(shapeName).join('; '))],
      ['Report content hash', code(r.contentHash, 'hash')],
      ...(s.checkpoint ? [['Signed audit checkpoint', text(checkpointWords(s.checkpoint))] as [string, string]] : []),
      ...(s.issuedCopy
        ? [
            [
              'Issued copy (content hashes)',
              `JSON ${code(s.issuedCopy.json, 'hash')} CSV ${code(s.issuedCopy.csv, 'hash')} HTML ${code(s.issuedCopy.html, 'hash')}`,
            ] as [string, string],
          ]
        : []),
      ...(s.note ? [['Note', text(s.note)] as [string, string]] : []),
    ]),
    approvalBlock(document),
  ];
  return tag('header', { class: 'statement', 'data-statement-id': s.id }, body.join('\n'));
}

export function renderStatementHtml(document: StatementDocument): string {
  return htmlDocument(
    statementTitle(document),
    `${statementHead(document)}\n${renderReportMain(document.report)}`,
    statementPrintCss(document),
  );
}
