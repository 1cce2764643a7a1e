/**
 * The printable savings report: one self-contained HTML5 document (inline
 * style sheet, inline SVG charts, no scripts, nothing fetched), in the
 * order a reader needs it: title block and caution, portfolio summary, one
 * section per facility, then methods, notices, frozen baselines and the
 * caution again. Every string from the report is escaped; every total cell
 * carries its exact value in `data-value` under a `data-total` key.
 */
import type { SavingsReport } from '../savings-report.js';
import { formatPercent } from '../format.js';
import { htmlDocument } from './document.js';
import { reportTitle, titleBlock } from './title-block.js';
import { portfolioSection } from './portfolio.js';
import { facilitySection } from './facility.js';
import { methodsSection } from './methods.js';
import { tag } from './markup.js';

/** Render the report as HTML text; a pure function of the report. */
export function renderReportHtml(report: SavingsReport): string {
  return htmlDocument(reportTitle(report), renderReportMain(report));
}

/** The report's main element alone (an issued statement wraps it in its own document). */
export function renderReportMain(report: SavingsReport): string {
  const confidenceLabel = formatPercent(report.confidence, 0);
  const context = { confidenceLabel, from: report.window.from, to: report.window.to };
  const body = [
    titleBlock(report),
    portfolioSection(report, confidenceLabel),
    ...report.facilities.map((facility) => facilitySection(facility, context)),
    methodsSection(report),
  ].join('\n');
  return tag('main', { class: 'report', 'data-report-hash': report.contentHash }, body);
}
