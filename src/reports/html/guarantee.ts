/**
 * Guarantee status: measured savings of a contract year against the
 * guaranteed figure, the shortfall or surplus, the ± band, and whether the
 * year is complete. Used per facility (with the cumulative chart) and in
 * the portfolio summary (one row per facility, year and measure).
 */
import type { FacilityReport, GuaranteeLine, GuaranteeStatus, SavingsReport } from '../savings-report.js';
import { formatNumber, formatSigned } from '../format.js';
import { shortDate } from '../svg/date-axis.js';
import { renderCumulativeSavingsSvg } from '../svg/cumulative-savings.js';
import { cell, numberCell, table, tag, text, totalCell } from './markup.js';
import { chartFigure } from './figure.js';

const DIGITS = 1;
const COST_DIGITS = 2;

interface Line {
  measure: string;
  unit: string;
  digits: number;
  line: GuaranteeLine;
  key: string;
}

/**
 * "Surplus" or "Shortfall", and whether the difference lies within the ± band.
 * Before the year is over the guarantee is not yet judged, so the words say "so far".
 */
export function guaranteeVerdict(line: GuaranteeLine, complete: boolean): { label: string; className: string } {
  const ahead = line.difference >= 0;
  const withinBand = Math.abs(line.difference) <= line.uncertainty;
  if (!complete)
    return { label: `${ahead ? 'Ahead' : 'Behind'} so far (year not complete)`, className: 'verdict-band' };
  return {
    label: withinBand ? `${ahead ? 'Surplus' : 'Shortfall'}, within the ± band` : ahead ? 'Surplus' : 'Shortfall',
    className: withinBand ? 'verdict-band' : ahead ? 'verdict-surplus' : 'verdict-shortfall',
  };
}

function linesOf(status: GuaranteeStatus, keyPrefix: string): Line[] {
  const lines: Line[] = [];
  if (status.energy)
    lines.push({
      measure: 'Energy',
      unit: status.energy.unit,
      digits: DIGITS,
      line: status.energy,
      key: `${keyPrefix}-energy`,
    });
  if (status.cost)
    lines.push({
      measure: 'Cost',
      unit: status.cost.currency,
      digits: COST_DIGITS,
      line: status.cost,
      key: `${keyPrefix}-cost`,
    });
  return lines;
}

/** A sentence on the year: complete, or not yet and counted through when. */
export function yearSentence(status: GuaranteeStatus): string {
  const span = `Contract year ${status.contractYear}: ${shortDate(status.yearStart)} to ${shortDate(status.yearEnd)} (end exclusive).`;
  return status.complete
    ? `${span} The year is complete and counted whole.`
    : `${span} Year not complete: counted through ${shortDate(status.measuredThrough)} (exclusive); the guarantee is judged when the year ends.`;
}

/** One facility's status for one contract year: sentence, figures and the cumulative chart. */
export function guaranteeBlock(facility: FacilityReport, status: GuaranteeStatus, confidenceLabel: string): string {
  const keyPrefix = `facility-${facility.id}-guarantee-${status.contractYear}`;
  if (status.metersWithData === 0) {
    return tag(
      'div',
      { class: 'guarantee-status', 'data-contract-year': status.contractYear },
      [
        tag('h4', {}, text(`Contract year ${status.contractYear}`)),
        tag('p', {}, text(yearSentence(status))),
        tag(
          'div',
          { class: 'missing', 'data-no-data': 'true' },
          `${tag('strong', {}, text('No data in this window. '))}${text('No meter has reporting figures in this contract year to date: nothing is measured, so no shortfall or surplus is stated.')}`,
        ),
      ].join('\n'),
    );
  }
  const lines = linesOf(status, keyPrefix);
  const rows = lines.map(({ measure, unit, digits, line, key }) => {
    const verdict = guaranteeVerdict(line, status.complete);
    return [
      tag('th', { scope: 'row' }, text(`${measure} (${unit})`)),
      totalCell(`${key}-measured`, line.measured, formatNumber(line.measured, digits)),
      totalCell(`${key}-uncertainty`, line.uncertainty, `± ${formatNumber(line.uncertainty, digits)}`),
      totalCell(`${key}-guaranteed`, line.guaranteed, formatNumber(line.guaranteed, digits)),
      totalCell(`${key}-difference`, line.difference, formatSigned(line.difference, digits)),
      tag('td', { class: verdict.className }, text(verdict.label)),
    ];
  });
  const figures =
    lines.length === 0
      ? tag('p', { class: 'note' }, text('The contract sets no guaranteed figure for this year.'))
      : table({
          className: 'compact guarantee',
          head: [
            '',
            { label: 'Measured', numeric: true },
            { label: `± (${confidenceLabel})`, numeric: true },
            { label: 'Guaranteed', numeric: true },
            { label: 'Difference', numeric: true },
            'Verdict',
          ],
          rows,
        });
  const unit = status.energy?.unit ?? facility.contract?.energyUnit ?? '';
  const chart = renderCumulativeSavingsSvg({
    title: `${facility.name}: contract year ${status.contractYear}`,
    unit,
    yearStart: status.yearStart,
    yearEnd: status.yearEnd,
    guaranteed: status.energy?.guaranteed ?? null,
    uncertainty: status.energy?.uncertainty ?? null,
    points: status.cumulative.map((c) => ({ end: c.end, value: c.energy })),
  });
  const caption = `Cumulative measured savings across contract year ${status.contractYear} in ${unit}, against the guaranteed figure; the band is the ± of the latest total.`;
  return tag(
    'div',
    { class: 'guarantee-status', 'data-contract-year': status.contractYear },
    [
      tag('h4', {}, text(`Contract year ${status.contractYear}`)),
      tag('p', {}, text(yearSentence(status))),
      figures,
      status.notes.length === 0
        ? ''
        : tag('ul', { class: 'guarantee-notes' }, status.notes.map((note) => tag('li', {}, text(note))).join('')),
      chartFigure('guarantee-cumulative', chart, caption),
    ].join('\n'),
  );
}

/** Every facility's guarantee lines in one table, for the portfolio summary. */
export function guaranteesSummary(report: SavingsReport, confidenceLabel: string): string {
  const rows: string[][] = [];
  for (const facility of report.facilities) {
    for (const status of facility.guarantees) {
      for (const { measure, unit, digits, line } of linesOf(status, '')) {
        if (status.metersWithData === 0) {
          rows.push([
            cell(facility.name),
            cell(`${status.contractYear}`, 'num'),
            cell(`${measure} (${unit})`),
            tag(
              'td',
              { colspan: 5, class: 'no-data', 'data-no-data': 'true' },
              text('no data in this window: not measured, not judged'),
            ),
            cell(status.complete ? 'complete' : `year not complete (through ${status.measuredThrough})`),
          ]);
          continue;
        }
        const verdict = guaranteeVerdict(line, status.complete);
        rows.push([
          cell(facility.name),
          cell(`${status.contractYear}`, 'num'),
          cell(`${measure} (${unit})`),
          numberCell(line.measured, formatNumber(line.measured, digits)),
          numberCell(line.uncertainty, `± ${formatNumber(line.uncertainty, digits)}`),
          numberCell(line.guaranteed, formatNumber(line.guaranteed, digits)),
          numberCell(line.difference, formatSigned(line.difference, digits)),
          tag('td', { class: verdict.className }, text(verdict.label)),
          cell(status.complete ? 'complete' : `year not complete (through ${status.measuredThrough})`),
        ]);
      }
    }
  }
  if (rows.length === 0)
    return tag(
      'p',
      { class: 'note' },
      text('No facility in this report has a guaranteed figure for a contract year in this window.'),
    );
  return table({
    className: 'guarantees-summary',
    head: [
      'Facility',
      { label: 'Year', numeric: true },
      'Measure',
      { label: 'Measured', numeric: true },
      { label: `± (${confidenceLabel})`, numeric: true },
      { label: 'Guaranteed', numeric: true },
      { label: 'Difference', numeric: true },
      'Verdict',
      'Year status',
    ],
    rows,
  });
}
