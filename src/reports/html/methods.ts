/**
 * The closing part of the report: how the figures were made (the method
 * texts, sources, unit factors and how meters were combined), the
 * notices, every frozen baseline used with its content hash, the normal
 * years, and the caution once more.
 */
import type { SavingsReport } from '../savings-report.js';
import { cell, code, numberCell, table, tag, text } from './markup.js';
import { caution } from './title-block.js';

/** The methods section and what follows it. */
export function methodsSection(report: SavingsReport): string {
  const m = report.method;
  const paragraphs: [string, string][] = [
    ['Method', m.summary],
    ['Readings in the window', m.readingsInWindow],
    ['Temperature form', m.temperatureForm],
    ['Baseline length and extrapolation', m.checks],
    ['Non-routine adjustments', m.adjustments],
    ['Costs', m.costs],
    ['Uncertainty', m.uncertainty],
    ['Combining meters', `${m.independence} ${rollupFigures(report)}`],
    ['Normalised savings', m.normalised],
  ];
  const parts = [
    tag('h2', {}, text('Methods')),
    tag('h3', {}, text('How the figures were made')),
    ...paragraphs.map(([title, body]) =>
      tag('div', { class: 'method', 'data-method': title }, `${tag('h4', {}, text(title))}${tag('p', {}, text(body))}`),
    ),
    tag('h3', {}, text('Sources')),
    tag('ol', { class: 'sources' }, m.sources.map((s) => tag('li', {}, text(s))).join('')),
    tag('h3', {}, text('Energy unit factors')),
    unitFactors(report),
    tag('h3', {}, text('Normal years')),
    normalYears(report),
  ];
  return [
    tag('section', { class: 'methods', id: 'methods' }, parts.join('\n')),
    tag('section', { class: 'notices' }, `${tag('h2', {}, text('Notices'))}${notices(report.notices)}`),
    tag('section', { class: 'baselines' }, `${tag('h2', {}, text('Frozen baselines used'))}${baselines(report)}`),
    tag('footer', { class: 'closing' }, caution(report.caution)),
  ].join('\n');
}

/** The roll-up's correlation figures in words. */
function rollupFigures(report: SavingsReport): string {
  const r = report.rollup;
  const figure = (value: number | null, pairs: number, where: string): string =>
    value === null
      ? `no two meters ${where} share enough months (taken as 0)`
      : `${value.toFixed(2)} ${where} (${pairs} meter pair${pairs === 1 ? '' : 's'})`;
  return `In this report: ${figure(r.withinStation, r.pairsWithinStation, 'on the same station')}; ${figure(r.acrossStations, r.pairsAcrossStations, 'across stations')}.`;
}

function unitFactors(report: SavingsReport): string {
  const body =
    report.unitFactors.length === 0
      ? tag('p', {}, text('No unit conversions were needed.'))
      : table({
          className: 'unit-factors',
          head: [
            'Unit',
            { label: 'Btu per unit', numeric: true },
            { label: 'MMBtu per unit', numeric: true },
            { label: 'GJ per unit', numeric: true },
          ],
          // Twelve significant digits hide binary rounding (0.0034121399999999997) yet show every digit a published factor has.
          rows: report.unitFactors.map((f) => [cell(f.unit), factorCell(f.btu), factorCell(f.mmbtu), factorCell(f.gj)]),
        });
  return body + tag('p', { class: 'note' }, text(`Source: ${report.unitFactorSource}`));
}

function factorCell(value: number): string {
  return numberCell(value, String(Number(value.toPrecision(12))));
}

function normalYears(report: SavingsReport): string {
  if (report.normalYears.length === 0) return tag('p', {}, text('No normal year was used in this report.'));
  return table({
    className: 'normal-years',
    head: ['Weather station', 'Source', 'Content hash'],
    rows: report.normalYears.map((n) => [
      tag('td', {}, code(n.stationId)),
      cell(n.source),
      tag('td', {}, code(n.contentHash, 'hash')),
    ]),
  });
}

function notices(list: readonly string[]): string {
  if (list.length === 0) return tag('p', {}, text('No notices.'));
  return tag('ul', { class: 'plain notices-list' }, list.map((n) => tag('li', {}, text(n))).join(''));
}

function baselines(report: SavingsReport): string {
  if (report.baselines.length === 0) return tag('p', {}, text('No frozen baseline was used.'));
  const meterNames = new Map(report.facilities.flatMap((f) => f.meters.map((m) => [m.id, m.name] as const)));
  return table({
    className: 'baselines',
    head: ['Meter', 'Meter id', 'Baseline id', { label: 'Version', numeric: true }, 'Content hash'],
    rows: report.baselines.map((b) => [
      cell(meterNames.get(b.meterId) ?? ''),
      tag('td', {}, code(b.meterId)),
      tag('td', {}, code(b.baselineId)),
      cell(String(b.version), 'num'),
      tag('td', {}, code(b.contentHash, 'hash')),
    ]),
  });
}
