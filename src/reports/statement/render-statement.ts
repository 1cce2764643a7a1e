/**
 * A statement in its three stored formats (statement-csv.ts, statement-html.ts,
 * statement-words.ts for the words all share). Pure functions of the statement
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
export { renderStatementCsv } from './statement-csv.js';
export { renderStatementHtml } from './statement-html.js';
import type { StatementDocument } from './statement-document.js';

export function renderStatementJson(document: StatementDocument): string {
  return `${JSON.stringify(document, null, 2)}\n`;
}
