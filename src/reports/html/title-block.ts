/**
 * The head of the report: who it is for, the window, the confidence of
 * every ±, the data it rests on (audit head and its own content hash), the
 * caution, and a list of the facility sections.
 */
import type { SavingsReport } from '../savings-report.js';
import { formatPercent } from '../format.js';
import { code, facts, tag, text } from './markup.js';

const CONFIDENCE_SOURCES = {
  request: ' (as requested)',
  contract: ' (the level the contract names)',
  default: ' (the default: no contract names a level)',
} as const;

/** The report's title line, also used as the document title. */
export function reportTitle(report: SavingsReport): string {
  return `Savings report: ${report.organisation.name}, ${report.window.label}`;
}

/** The title block, the caution and the contents. */
export function titleBlock(report: SavingsReport): string {
  const window = report.window;
  const kind = { range: 'date range', quarter: 'quarter', 'contract-year': 'contract year' }[window.kind];
  const header = [
    tag('h1', {}, text('Avoided-energy savings report')),
    tag('p', { class: 'lead' }, `${text(report.organisation.name)} &#183; ${text(window.label)}`),
    facts([
      ['Organisation', `${text(report.organisation.name)} ${code(report.organisation.id)}`],
      ['Reporting window', `${text(window.from)} to ${text(window.to)} (end exclusive, ${text(kind)})`],
      [
        'Confidence of every ±',
        text(
          `${formatPercent(report.confidence, 0)} two-sided${CONFIDENCE_SOURCES[report.confidenceSource ?? 'request']}; the ASHRAE Guideline 14 significance verdict is always judged at 68%`,
        ),
      ],
      [
        'Data as of',
        `audit sequence ${text(String(report.dataAsOf.auditSeq))}, hash ${code(report.dataAsOf.auditHash, 'hash')}`,
      ],
      ['Report content hash', code(report.contentHash, 'hash')],
      ['Format', text(`${report.format}, version ${report.version}`)],
    ]),
  ];
  return [tag('header', { class: 'title-block' }, header.join('\n')), caution(report.caution), contents(report)].join(
    '\n',
  );
}

/** The caution, boxed so nobody can miss it. */
export function caution(message: string): string {
  return tag('aside', { class: 'caution', role: 'note' }, `${tag('strong', {}, text('Caution'))}${text(message)}`);
}

function contents(report: SavingsReport): string {
  const items = [
    tag('li', {}, tag('a', { href: '#portfolio' }, text('Portfolio summary'))),
    ...report.facilities.map((f) => tag('li', {}, tag('a', { href: `#facility-${f.id}` }, text(f.name)))),
    tag('li', {}, tag('a', { href: '#methods' }, text('Methods, notices and frozen baselines'))),
  ];
  return tag(
    'nav',
    { class: 'contents', 'aria-label': 'Contents' },
    `${tag('h4', {}, text('Contents'))}${tag('ol', {}, items.join(''))}`,
  );
}
