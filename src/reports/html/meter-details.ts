/**
 * What a reader must weigh beside a meter's figures: the extrapolation
 * share, the significance test, normalised savings (or why there are none),
 * days without a contract rate, readings left out, and every non-routine
 * adjustment with its reason, as recorded.
 */
import type { MeterReport, NormalisedSavings, ReportAdjustment } from '../savings-report.js';
import { decimalsFor, formatNumber, formatPercent } from '../format.js';
import { cell, code, facts, numberCell, table, tag, text } from './markup.js';

/** The findings block of one meter (shown for meters with and without figures). */
export function meterFindings(meter: MeterReport): string {
  const parts: string[] = [];
  if (meter.missing === null && meter.energy !== null) {
    parts.push(tag('h4', {}, text('Findings')), findingFacts(meter));
    parts.push(tag('h4', {}, text('Normalised savings')), normalised(meter.normalised, meter.unit));
    parts.push(tag('h4', {}, text('Days without a contract rate')), missingRates(meter));
  }
  if (meter.missing === null || meter.excluded.length > 0)
    parts.push(tag('h4', {}, text('Readings left out')), excluded(meter));
  if (meter.missing === null || meter.adjustments.length > 0)
    parts.push(tag('h4', {}, text('Non-routine adjustments')), adjustments(meter.adjustments, meter.unit));
  return parts.join('\n');
}

function findingFacts(meter: MeterReport): string {
  const outside = meter.periods.filter((p) => p.outsideBaselineRange).length;
  const extrapolation =
    outside === 0
      ? 'None: every reporting period lies within the baseline’s temperature range.'
      : `${formatPercent(meter.extrapolationShare)} of the model baseline comes from ${outside} period${outside === 1 ? '' : 's'} outside the baseline’s temperature range, where the model extrapolates.`;
  const significance = meter.significant
    ? 'Significant: the uncertainty is below 50% of the savings at 68% confidence (the ASHRAE Guideline 14 test), by the more cautious of the two uncertainty formulas.'
    : 'Not significant: the uncertainty is not below 50% of the savings at 68% confidence (the ASHRAE Guideline 14 test), so the savings cannot be told apart from model error.';
  return facts([
    ['Extrapolation', text(extrapolation)],
    ['Significance', tag('span', { 'data-significant': String(meter.significant) }, text(significance))],
  ]);
}

function normalised(n: NormalisedSavings, unit: string): string {
  if (!n.available) return tag('p', { 'data-normalised': 'unavailable' }, text(`Not available: ${n.reason}`));
  const digits = decimalsFor([n.baselineUse, n.reportingUse]);
  const rows = [
    [
      tag('th', { scope: 'row' }, text(`Frozen baseline over the normal year (${unit})`)),
      numberCell(n.baselineUse, formatNumber(n.baselineUse, digits)),
    ],
    [
      tag('th', { scope: 'row' }, text(`Reporting-period ${n.reportingModel} model over the normal year (${unit})`)),
      numberCell(n.reportingUse, formatNumber(n.reportingUse, digits)),
    ],
    [
      tag('th', { scope: 'row' }, text(`Normalised savings (${unit})`)),
      numberCell(n.savings, formatNumber(n.savings, digits)),
    ],
    ...(n.uncertainty
      ? [
          [
            tag(
              'th',
              { scope: 'row' },
              text(
                `± at ${Math.round(n.uncertainty.confidence * 100)}% (both models’ prediction variance on the normal year, ${unit})`,
              ),
            ),
            numberCell(n.uncertainty.absolute, formatNumber(n.uncertainty.absolute, digits)),
          ],
        ]
      : []),
    [tag('th', { scope: 'row' }, text('Fraction saved')), numberCell(n.fractionSaved, formatPercent(n.fractionSaved))],
    [
      tag('th', { scope: 'row' }, text('Reporting periods fitted')),
      numberCell(n.reportingPeriods, String(n.reportingPeriods)),
    ],
    [
      tag('th', { scope: 'row' }, text('Normal year applied as')),
      tag(
        'td',
        { class: 'num' },
        text(n.normalYearAs === 'months' ? 'calendar months (the model was fitted on bills)' : 'single days'),
      ),
    ],
    [
      tag('th', { scope: 'row' }, text('Normal-year days outside either model’s range')),
      numberCell(n.outsideRangeShare, formatPercent(n.outsideRangeShare)),
    ],
  ];
  return table({ className: 'summary normalised', head: ['', { label: 'Value', numeric: true }], rows });
}

function missingRates(meter: MeterReport): string {
  if (meter.missingRates.length === 0)
    return tag('p', {}, text('None: every day of the reporting periods has a contract rate.'));
  const items = meter.missingRates.map((r) => tag('li', {}, text(`${r.start} to ${r.end} (end exclusive)`)));
  return (
    tag('p', {}, text('No contract rate on these days; the periods touching them carry no cost avoided:')) +
    tag('ul', { class: 'plain missing-rates' }, items.join(''))
  );
}

function excluded(meter: MeterReport): string {
  if (meter.excluded.length === 0) return tag('p', {}, text('None.'));
  return table({
    className: 'excluded',
    head: ['Start', 'End', 'Reason'],
    rows: meter.excluded.map((e) => [cell(e.start), cell(e.end), cell(e.reason)]),
  });
}

function adjustments(list: readonly ReportAdjustment[], unit: string): string {
  if (list.length === 0) return tag('p', {}, text('None recorded for this window.'));
  const rows = list.map((a) => {
    const amount =
      a.quantity !== null
        ? `${formatNumber(a.quantity, decimalsFor([a.quantity]))} ${unit} in total`
        : `${formatNumber(a.perDay, decimalsFor([a.perDay]))} ${unit} per day`;
    // The stated ± on a line of its own (a block span): the cell does not wrap.
    const stated =
      a.uncertainty === null
        ? ''
        : `${tag('span', { class: 'stated-uncertainty', title: 'the engineer’s standard uncertainty (one standard deviation) of the whole total' }, text(`± ${formatNumber(a.uncertainty, decimalsFor([a.uncertainty]))} (1 s.d.)`))}`;
    return tag(
      'tr',
      { 'data-adjustment-id': a.id },
      [
        tag('td', {}, code(a.id)),
        cell(`${a.start} to ${a.end}`),
        tag('td', { class: 'num' }, text(amount) + stated),
        numberCell(a.appliedInWindow, formatNumber(a.appliedInWindow, decimalsFor([a.appliedInWindow]))),
        cell(a.reason, 'adjustment-reason'),
        cell(`${a.recordedAt} by ${a.recordedBy}`),
      ].join(''),
    );
  });
  return table({
    className: 'adjustments',
    head: [
      'Id',
      'Dates (end exclusive)',
      { label: 'As recorded', numeric: true },
      { label: `Applied in window (${unit})`, numeric: true },
      'Reason',
      'Recorded',
    ],
    rows,
  });
}
