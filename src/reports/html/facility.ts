/**
 * One facility's section: the contract and the status of each contract year
 * against its guarantee, the facility totals, a table of its meters, and
 * then each meter in full. In print every facility starts a new page.
 */
import type { FacilityReport, MeterReport } from '../savings-report.js';
import { formatNumber, formatPercent, NO_VALUE } from '../format.js';
import { cell, code, facts, table, tag, text } from './markup.js';
import { costTotalsTable, energyHeadline, energyTotalsTable } from './totals.js';
import { guaranteeBlock } from './guarantee.js';
import { meterSection } from './meter.js';

/** The facility's section element. */
export function facilitySection(
  facility: FacilityReport,
  context: { confidenceLabel: string; from: string; to: string },
): string {
  const heading = [
    tag('h2', {}, text(facility.name)),
    tag(
      'p',
      { class: 'note' },
      `${facility.address === null ? '' : `${text(facility.address)} &#183; `}facility ${code(facility.id)}`,
    ),
  ];
  const parts = [
    ...heading,
    tag('h3', {}, text('Contract and guarantee')),
    contractBlock(facility),
    ...guaranteeBlocks(facility, context.confidenceLabel),
    tag('h3', {}, text('Facility totals')),
    ...(facility.metersWithData === 0
      ? [
          noDataInWindow(
            'No meter of this facility has reporting figures in this window; it is left out of the portfolio’s sums.',
          ),
        ]
      : [
          energyHeadline(facility.totals, context.confidenceLabel),
          energyTotalsTable(`facility-${facility.id}`, facility.totals, context.confidenceLabel),
          costTotalsTable(`facility-${facility.id}`, facility.cost, context.confidenceLabel),
        ]),
    tag('h3', {}, text('Meters')),
    meterOverview(facility.meters),
    ...facility.meters.map((meter) => meterSection(facility, meter, context)),
  ];
  return tag(
    'section',
    { class: 'facility', id: `facility-${facility.id}`, 'data-facility-id': facility.id },
    parts.join('\n'),
  );
}

/** The words a reader sees where a facility or contract year has nothing to sum: never 0.0 ± 0.0. */
export function noDataInWindow(detail: string): string {
  return tag(
    'div',
    { class: 'missing', 'data-no-data': 'true' },
    `${tag('strong', {}, text('No data in this window. '))}${text(detail)}`,
  );
}

function contractBlock(facility: FacilityReport): string {
  const contract = facility.contract;
  if (contract === null)
    return tag(
      'p',
      {},
      text('No performance contract is recorded for this facility: its savings are reported without a guarantee.'),
    );
  const schedule =
    contract.guarantees.length === 0
      ? tag('p', { class: 'note' }, text('The contract lists no guaranteed figures.'))
      : table({
          className: 'compact guarantee-schedule',
          head: [
            { label: 'Contract year', numeric: true },
            { label: `Guaranteed energy (${contract.energyUnit})`, numeric: true },
            { label: `Guaranteed cost (${contract.currency ?? 'no currency'})`, numeric: true },
          ],
          rows: contract.guarantees.map((g) => [
            cell(String(g.year), 'num'),
            cell(formatNumber(g.energy, 1), 'num'),
            cell(formatNumber(g.cost, 2), 'num'),
          ]),
        });
  return [
    facts([
      ...contractIdentification(contract),
      ['Contract start', text(contract.start)],
      ['Term', text(`${contract.years} year${contract.years === 1 ? '' : 's'}`)],
      ['Guarantee energy unit', text(contract.energyUnit)],
      ['Currency', text(contract.currency ?? NO_VALUE)],
    ]),
    schedule,
  ].join('\n');
}

/** The contract's reference, parties, M&V plan and option, and its confidence level, where the contract states them. */
function contractIdentification(contract: NonNullable<FacilityReport['contract']>): [string, string][] {
  const rows: [string, string][] = [];
  rows.push(['Contract reference', text(contract.reference ?? 'not stated on the contract')]);
  for (const party of contract.parties ?? []) rows.push([`Party (${party.role})`, text(party.name)]);
  const option = contract.mvOption ? `, IPMVP option ${contract.mvOption}` : '';
  rows.push([
    'M&V plan',
    text(contract.mvPlanReference ? `${contract.mvPlanReference}${option}` : `not stated on the contract${option}`),
  ]);
  if (contract.confidence !== undefined)
    rows.push(['Confidence level of the contract', text(`${Math.round(contract.confidence * 100)}% two-sided`)]);
  return rows;
}

function guaranteeBlocks(facility: FacilityReport, confidenceLabel: string): string[] {
  if (facility.contract === null) return [];
  if (facility.guarantees.length === 0)
    return [tag('p', { class: 'note' }, text('No contract year of this facility falls in the reporting window.'))];
  return facility.guarantees.map((status) => guaranteeBlock(facility, status, confidenceLabel));
}

function g14Label(value: boolean | null): string {
  return value === null ? 'cannot be judged' : value ? 'meets' : 'does not meet';
}

function meterOverview(meters: readonly MeterReport[]): string {
  if (meters.length === 0) return tag('p', { class: 'note' }, text('No meters.'));
  const rows = meters.map((m) => [
    tag('td', {}, tag('a', { href: `#meter-${m.id}` }, text(m.name))),
    tag('td', {}, code(m.id)),
    cell(m.fuel),
    cell(m.unit),
    cell(
      m.baseline === null
        ? 'none'
        : `${m.baseline.model}, version ${m.baseline.version}, ${m.baseline.start} to ${m.baseline.end}`,
    ),
    cell(m.baseline === null ? NO_VALUE : formatPercent(m.baseline.cvrmse), 'num'),
    cell(m.baseline === null ? NO_VALUE : g14Label(m.baseline.meetsGuideline14)),
    cell(
      m.missing === null
        ? `${m.periods.length} reporting period${m.periods.length === 1 ? '' : 's'}`
        : 'no data in this window (see below)',
    ),
  ]);
  return table({
    className: 'meter-overview',
    head: [
      'Meter',
      'Id',
      'Fuel',
      'Unit',
      'Frozen baseline',
      { label: 'CV(RMSE)', numeric: true },
      'Guideline 14 check',
      'In this window',
    ],
    rows,
  });
}
