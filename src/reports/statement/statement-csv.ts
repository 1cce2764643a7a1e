/**
 * A statement as CSV: the report's own table with the statement's rows first
 * (record = statement, statement-step), in the report's columns.
 */
import { renderReportCsv, csvText } from '../csv.js';
import type { StatementDocument } from './statement-document.js';
import { checkpointWords, statusWords, stepLine, utc } from './statement-words.js';

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
        ...(s.issuedCopy
          ? [`issued copy hashes json ${s.issuedCopy.json} csv ${s.issuedCopy.csv} html ${s.issuedCopy.html}`]
          : []),
        ...(s.checkpoint ? [checkpointWords(s.checkpoint)] : []),
        ...(s.note ? [`note: ${s.note}`] : []),
      ].join('; '),
    }),
    ...s.steps.map((step) => row({ record: 'statement-step', note: stepLine(step) })),
    ...(s.status === 'prepared'
      ? [row({ record: 'statement-step', note: 'Approval: awaiting (not yet approved by an analyst)' })]
      : []),
  ];
  return `${header}\r\n${rows.join('\r\n')}\r\n${reportCsv.slice(firstBreak + 2)}`;
}
