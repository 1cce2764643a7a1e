/**
 * The portfolio summary, first after the title block: totals in MMBtu and
 * GJ with their ±, cost avoided by currency, each facility's share, and the
 * guarantees of every facility in one table.
 */
import type { SavingsReport } from '../savings-report.js';
import { formatNumber, formatPercent } from '../format.js';
import { cell, numberCell, table, tag, text } from './markup.js';
import { costTotalsTable, energyHeadline, energyTotalsTable } from './totals.js';
import { guaranteesSummary } from './guarantee.js';

/** The portfolio section. */
export function portfolioSection(report: SavingsReport, confidenceLabel: string): string {
  const p = report.portfolio;
  const scope = `${p.meters} meter${p.meters === 1 ? '' : 's'} in ${report.facilities.length} facilit${report.facilities.length === 1 ? 'y' : 'ies'}; ${p.metersInRollup} in the energy roll-up (converted to MMBtu and GJ).`;
  const parts = [
    tag('h2', {}, text('Portfolio summary')),
    tag('p', {}, text(scope)),
    energyHeadline(p.totals, confidenceLabel),
    tag('h3', {}, text('Energy')),
    energyTotalsTable('portfolio', p.totals, confidenceLabel),
    tag('h3', {}, text('Cost avoided')),
    costTotalsTable('portfolio', p.cost, confidenceLabel),
    tag('h3', {}, text('By facility')),
    facilityBreakdown(report),
    tag('h3', {}, text('Guarantees')),
    guaranteesSummary(report, confidenceLabel),
  ];
  return tag('section', { class: 'portfolio', id: 'portfolio' }, parts.join('\n'));
}

function facilityBreakdown(report: SavingsReport): string {
  const rows = report.facilities.map((f) => [
    tag('td', {}, tag('a', { href: `#facility-${f.id}` }, text(f.name))),
    cell(String(f.meters.length), 'num'),
    ...(f.metersWithData === 0 ? noData() : figures(f)),
  ]);
  return table({
    className: 'facility-breakdown',
    head: [
      'Facility',
      { label: 'Meters', numeric: true },
      { label: 'Avoided (MMBtu)', numeric: true },
      { label: '±', numeric: true },
      { label: 'Fraction saved', numeric: true },
      { label: 'Cost avoided', numeric: true },
    ],
    rows,
  });
}

/** A facility without reporting figures: words, not 0.0 ± 0.0 (it adds nothing to the sums). */
function noData(): string[] {
  return [
    tag(
      'td',
      { colspan: 4, class: 'no-data', 'data-no-data': 'true' },
      text('no data in this window (left out of the sums)'),
    ),
  ];
}

function figures(f: SavingsReport['facilities'][number]): string[] {
  return [
    numberCell(f.totals.MMBtu.savings, formatNumber(f.totals.MMBtu.savings, 1)),
    numberCell(f.totals.MMBtu.uncertainty, `± ${formatNumber(f.totals.MMBtu.uncertainty, 1)}`),
    numberCell(f.totals.MMBtu.fractionSaved, formatPercent(f.totals.MMBtu.fractionSaved)),
    cell(
      f.cost.length === 0 ? '—' : f.cost.map((c) => `${c.currency} ${formatNumber(c.avoided, 2)}`).join('; '),
      'num',
    ),
  ];
}
