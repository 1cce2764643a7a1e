/**
 * A statement as HTML: the statement head (identification, issue and
 * data-through dates, the approval block) before the report, with a print
 * layout of its own: a running header naming the statement and its status
 * on every page, and "Page N of M" at the foot (CSS paged media margin
 * boxes).
 */
import { htmlDocument } from '../html/document.js';
import { renderReportMain } from '../html/render-report.js';
import { code, facts, tag, text } from '../html/markup.js';
import { shapeName } from '../shape-names.js';
import type { StatementDocument } from './statement-document.js';
import { STEP_WORDS, checkpointWords, statementTitle, statusWords, utc } from './statement-words.js';

/** A CSS string literal: every character outside a plain set as a six-digit escape, so nothing can close the rule or the style element. */
function cssString(value: string): string {
  let out = '"';
  for (const ch of value) {
    out += /^[A-Za-z0-9 .,:;_()/#-]$/.test(ch) ? ch : `\\${ch.codePointAt(0)!.toString(16).padStart(6, '0')}`;
  }
  return `${out}"`;
}

/** The print layout of a statement: running header and page numbers in the page margins. */
function statementPrintCss(document: StatementDocument): string {
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
        [
          cell('Approval'),
          cell('awaiting approval by an analyst other than the preparer'),
          cell(''),
          cell(''),
          cell(''),
          cell(''),
        ].join(''),
      ),
    );
  const head = row(
    ['Step', 'Name', 'Role', 'Key', 'Time (UTC)', 'Reason'].map((h) => tag('th', { scope: 'col' }, text(h))),
  );
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
  const shapes = [
    ...new Set(r.facilities.flatMap((f) => f.meters.flatMap((m) => (m.baseline ? [m.baseline.model] : [])))),
  ].sort();
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
      [
        'Confidence of every ±',
        text(`${Math.round(r.confidence * 100)}% two-sided; the Guideline 14 significance verdict at 68%`),
      ],
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
