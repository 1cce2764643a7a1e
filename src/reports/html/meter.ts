/**
 * One meter in full: its frozen baseline, the period table with totals, the
 * three charts, and the findings a reader must weigh (extrapolation,
 * significance, normalised savings, missing rates, excluded periods, every
 * non-routine adjustment). A meter without figures shows why instead.
 */
import type { FacilityReport, MeterReport } from '../savings-report.js';
import { decimalsFor, formatNumber, formatPercent, NO_VALUE, rateDecimals } from '../format.js';
import { cell, code, facts, numberCell, table, tag, text, totalCell } from './markup.js';
import { shapeName } from '../shape-names.js';
import { meterCharts } from './meter-charts.js';
import { meterFindings } from './meter-details.js';

/** The same downward triangle the period-comparison chart draws over such periods. */
const OUTSIDE_MARK = '&#9660;';

export interface MeterContext {
  confidenceLabel: string;
  /** The report window, for the meter's cumulative chart. */
  from: string;
  to: string;
}

/** The meter's article element. */
export function meterSection(facility: FacilityReport, meter: MeterReport, context: MeterContext): string {
  const parts = [
    tag('h3', {}, text(meter.name)),
    tag('p', { class: 'note' }, `${text(`${meter.fuel} · ${meter.unit}`)} &#183; meter ${code(meter.id)}`),
    baselineFacts(meter),
  ];
  if (meter.missing !== null || meter.energy === null) {
    const reason = meter.missing ?? 'the report carries no totals for this meter';
    parts.push(
      tag(
        'div',
        { class: 'missing', 'data-missing': 'true' },
        `${tag('strong', {}, text('No data in this window: '))}${text(reason)}`,
      ),
    );
  } else {
    parts.push(
      tag('h4', {}, text('Reporting periods')),
      periodTable(meter),
      tag('h4', {}, text('Totals')),
      meterTotals(meter, context.confidenceLabel),
    );
    parts.push(tag('h4', {}, text('Charts')), meterCharts(meter, context));
  }
  parts.push(meterFindings(meter));
  return tag(
    'article',
    { class: 'meter', id: `meter-${meter.id}`, 'data-meter-id': meter.id, 'data-facility-id': facility.id },
    parts.join('\n'),
  );
}

function degreeOf(meter: MeterReport): string {
  return meter.temperatureUnit === 'F' ? '°F' : '°C';
}

function baselineFacts(meter: MeterReport): string {
  const b = meter.baseline;
  if (b === null) return tag('p', {}, text('No frozen baseline.'));
  const degree = degreeOf(meter);
  const g14 =
    b.meetsGuideline14 === null
      ? 'cannot be judged for this reporting length'
      : b.meetsGuideline14
        ? 'meets the CV(RMSE) and NMBE targets'
        : 'does not meet the CV(RMSE) and NMBE targets';
  const form =
    b.temperatureForm === 'daily'
      ? 'day-resolved: each bill against the mean over its days of the daily response (variable-base degree-days)'
      : 'mean: each period at its mean temperature';
  const rows: [string, string][] = [
    [
      'Frozen baseline',
      `${text(`${b.modelName ?? shapeName(b.model)} model, version ${b.version}, ${b.start} to ${b.end} (end exclusive)`)}`,
    ],
    ['Weather station', `${text(meter.weatherStationName ?? '')} ${code(meter.weatherStationId)}`],
    ['Temperature form', tag('span', { 'data-temperature-form': b.temperatureForm }, text(form))],
    [
      'Baseline temperature range',
      text(
        `${formatNumber(b.temperatureRange.min, 1)} to ${formatNumber(b.temperatureRange.max, 1)}${degree === '' ? '' : ` ${degree}`}`,
      ),
    ],
    ['CV(RMSE)', text(`${formatPercent(b.cvrmse)}; ASHRAE Guideline 14: ${g14}`)],
    ...(b.nmbe !== undefined ? [['NMBE', text(formatPercent(b.nmbe, 3))] as [string, string]] : []),
    ['Baseline id and content hash', `${code(b.id)} ${code(b.contentHash, 'hash')}`],
  ];
  if (meter.notes.length > 0) {
    rows.push([
      'Baseline notes',
      tag(
        'ul',
        { class: 'plain baseline-notes' },
        meter.notes.map((n) => tag('li', { 'data-baseline-note': 'true' }, text(n))).join(''),
      ),
    ]);
  }
  if (meter.weatherFills.length > 0) {
    rows.push([
      'Filled weather',
      tag(
        'ul',
        { class: 'plain weather-fills' },
        meter.weatherFills
          .map((f) => tag('li', { 'data-weather-fill': 'true' }, text(`${f.start} to ${f.end}: ${f.summary}`)))
          .join(''),
      ),
    ]);
  }
  return facts(rows) + modelTable(meter);
}

/** The frozen model's coefficients and changepoints, each with its standard error. */
function modelTable(meter: MeterReport): string {
  const b = meter.baseline;
  if (b === null || (b.coefficients === undefined && b.changepoints === undefined)) return '';
  const degree = degreeOf(meter);
  const perDay = `${meter.unit} per day`;
  const unitOf = (name: string) => (/slope/i.test(name) ? `${perDay} per ${degree}` : perDay);
  const value = (x: number | null) => (x === null ? NO_VALUE : formatNumber(x, decimalsFor([x]) + 1));
  const rows = [
    ...(b.coefficients ?? []).map((c) => [
      cell(c.name),
      cell(unitOf(c.name)),
      numberCell(c.estimate, value(c.estimate)),
      numberCell(c.standardError, value(c.standardError)),
    ]),
    ...(b.changepoints ?? []).map((c) => [
      cell(`changepoint ${c.name}`),
      cell(degree),
      numberCell(c.estimate, value(c.estimate)),
      numberCell(c.standardError, value(c.standardError)),
    ]),
  ];
  return table({
    className: 'compact model-parameters',
    caption: 'Frozen model: coefficients (slopes as change in use per day per degree) and changepoints',
    head: ['Parameter', 'Unit', { label: 'Estimate', numeric: true }, { label: 'Standard error', numeric: true }],
    rows,
  });
}

function currencyOf(meter: MeterReport): string {
  return meter.cost?.currency ?? '';
}

function periodTable(meter: MeterReport): string {
  const digits = decimalsFor(meter.periods.flatMap((p) => [p.actual, p.adjustedBaseline]));
  const firstRate = meter.periods.find((p) => p.rate !== null)?.rate ?? null;
  const rateDigits = rateDecimals(firstRate);
  const degree = degreeOf(meter);
  const currency = currencyOf(meter);
  const amount = (v: number | null) => formatNumber(v, digits);
  const rows = meter.periods.map((p) => {
    const cells = [
      tag('td', { class: 'date' }, text(p.start)),
      tag('td', { class: 'date' }, text(p.end)),
      numberCell(p.days, String(p.days)),
      numberCell(p.meanTemp, formatNumber(p.meanTemp, 1)),
      numberCell(p.actual, amount(p.actual)),
      numberCell(p.modelBaseline, amount(p.modelBaseline)),
      numberCell(p.adjustment, p.adjustment === 0 ? NO_VALUE : amount(p.adjustment)),
      numberCell(p.adjustedBaseline, amount(p.adjustedBaseline)),
      numberCell(p.savings, amount(p.savings)),
      numberCell(p.rate, formatNumber(p.rate, rateDigits)),
      numberCell(p.costAvoided, formatNumber(p.costAvoided, 2)),
      tag(
        'td',
        { class: 'range' },
        p.outsideBaselineRange
          ? tag(
              'span',
              { class: 'outside-mark', title: "Mean temperature outside the baseline's range: the model extrapolates" },
              OUTSIDE_MARK,
            )
          : '',
      ),
    ];
    return tag(
      'tr',
      {
        class: p.outsideBaselineRange ? 'outside' : undefined,
        'data-outside': p.outsideBaselineRange ? 'true' : undefined,
      },
      cells.join(''),
    );
  });
  const e = meter.energy!;
  const days = meter.periods.reduce((sum, p) => sum + p.days, 0);
  const key = `meter-${meter.id}`;
  const foot = [
    tag('th', { scope: 'row', colspan: 2 }, text('Total')),
    totalCell(`${key}-days`, days, String(days)),
    tag('td', {}),
    totalCell(`${key}-actual`, e.actual, amount(e.actual)),
    totalCell(`${key}-model-baseline`, e.modelBaseline, amount(e.modelBaseline)),
    totalCell(`${key}-adjustments`, e.adjustments, amount(e.adjustments)),
    totalCell(`${key}-adjusted-baseline`, e.adjustedBaseline, amount(e.adjustedBaseline)),
    totalCell(`${key}-savings`, e.savings, amount(e.savings)),
    tag('td', {}),
    totalCell(`${key}-cost`, meter.cost?.avoided ?? null, formatNumber(meter.cost?.avoided ?? null, 2)),
    tag('td', {}),
  ];
  const unit = meter.unit;
  const tableMarkup = table({
    className: 'periods',
    head: [
      'Start',
      'End',
      { label: 'Days', numeric: true },
      { label: `Mean temp.${degree === '' ? '' : ` (${degree})`}`, numeric: true },
      { label: `Actual (${unit})`, numeric: true },
      { label: 'Model baseline', numeric: true },
      { label: 'Adjustment', numeric: true },
      { label: 'Adjusted baseline', numeric: true },
      { label: 'Savings', numeric: true },
      { label: `Rate (${currency === '' ? 'per' : `${currency}/`}${unit})`, numeric: true },
      { label: `Cost avoided${currency === '' ? '' : ` (${currency})`}`, numeric: true },
      'Out of range',
    ],
    rows,
    foot: [foot],
  });
  const note = tag(
    'p',
    { class: 'note' },
    `${tag('span', { class: 'outside-mark' }, OUTSIDE_MARK)} ${text("marks a period whose mean temperature lies outside the baseline's range (shaded in the chart): the model extrapolates there. End dates are exclusive.")}`,
  );
  return tableMarkup + note;
}

/** The meter's totals beside their ±: in its own unit, in the common units, and in money; the savings and cost cells repeat the period table's totals. */
function meterTotals(meter: MeterReport, confidenceLabel: string): string {
  const e = meter.energy!;
  const key = `meter-${meter.id}`;
  const digits = decimalsFor([e.actual, e.adjustedBaseline]);
  const rows: string[][] = [
    [
      tag('th', { scope: 'row' }, text(`Energy (${e.unit})`)),
      numberCell(e.savings, formatNumber(e.savings, digits)),
      totalCell(`${key}-uncertainty`, e.uncertainty, `± ${formatNumber(e.uncertainty, digits)}`),
      totalCell(`${key}-fraction-saved`, e.fractionSaved, formatPercent(e.fractionSaved)),
    ],
  ];
  if (meter.common !== null) {
    for (const unit of ['MMBtu', 'GJ'] as const) {
      const c = meter.common[unit];
      rows.push([
        tag('th', { scope: 'row' }, text(`Energy (${unit})`)),
        totalCell(`${key}-savings-${unit}`, c.savings, formatNumber(c.savings, 1)),
        totalCell(`${key}-uncertainty-${unit}`, c.uncertainty, `± ${formatNumber(c.uncertainty, 1)}`),
        numberCell(c.fractionSaved, formatPercent(c.fractionSaved)),
      ]);
    }
  }
  if (meter.cost !== null) {
    const c = meter.cost;
    rows.push([
      tag('th', { scope: 'row' }, text(`Cost avoided (${c.currency})`)),
      numberCell(c.avoided, formatNumber(c.avoided, 2)),
      totalCell(`${key}-cost-uncertainty`, c.uncertainty, `± ${formatNumber(c.uncertainty, 2)}`),
      tag('td', {}),
    ]);
  }
  const notes: string[] = [];
  if (meter.common === null && meter.commonNote !== null)
    notes.push(`Not in the MMBtu and GJ roll-up: ${meter.commonNote}.`);
  if (meter.cost !== null && meter.cost.periodsWithoutRate > 0)
    notes.push(
      `${meter.cost.periodsWithoutRate} period${meter.cost.periodsWithoutRate === 1 ? '' : 's'} without a contract rate left out of the cost.`,
    );
  if (meter.cost === null) notes.push('No cost avoided: no contract rate applies to this meter in the window.');
  const parts = meter.uncertaintyParts;
  if (parts !== null && parts.adjustments > 0) {
    notes.push(
      `The ± combines in quadrature the model’s ± ${formatNumber(parts.model, digits)} and the non-routine adjustments’ own ± ${formatNumber(parts.adjustments, digits)} (${e.unit}).`,
    );
  }
  const head = [
    '',
    { label: 'Avoided', numeric: true },
    { label: `± (${confidenceLabel})`, numeric: true },
    { label: 'Fraction saved', numeric: true },
  ];
  return (
    table({ className: 'summary meter-totals', head, rows }) +
    notes.map((n) => tag('p', { class: 'note' }, text(n))).join('')
  );
}
