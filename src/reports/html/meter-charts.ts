/**
 * A meter's three charts from the report's own figures: actual against the
 * adjusted baseline per period, the meter's cumulative avoided energy over
 * the window, and its energy signature (baseline and reporting periods
 * around the frozen model's line).
 */
import type { MeterReport } from '../savings-report.js';
import { renderPeriodComparisonSvg } from '../svg/period-comparison.js';
import { renderCumulativeSavingsSvg } from '../svg/cumulative-savings.js';
import { renderSignatureSvg } from '../svg/signature.js';
import { tag, text } from './markup.js';
import { chartFigure } from './figure.js';

/** The charts of a meter with figures, each in its figure. */
export function meterCharts(meter: MeterReport, window: { from: string; to: string }): string {
  return tag(
    'div',
    { class: 'charts' },
    [periodComparison(meter), cumulative(meter, window), signature(meter)].join('\n'),
  );
}

function periodComparison(meter: MeterReport): string {
  const svg = renderPeriodComparisonSvg({
    title: `${meter.name}: actual against adjusted baseline`,
    unit: meter.unit,
    periods: meter.periods.map((p) => ({
      start: p.start,
      end: p.end,
      actual: p.actual,
      adjustedBaseline: p.adjustedBaseline,
      outsideBaselineRange: p.outsideBaselineRange,
    })),
  });
  return chartFigure(
    'period-comparison',
    svg,
    `Use per reporting period in ${meter.unit}: the adjusted baseline (frozen model on the period's weather, plus non-routine adjustments) beside actual use.`,
  );
}

function cumulative(meter: MeterReport, window: { from: string; to: string }): string {
  const ordered = [...meter.periods].sort((a, b) => (a.end < b.end ? -1 : a.end > b.end ? 1 : 0));
  let running = 0;
  const points = ordered.map((p) => ({ end: p.end, value: (running += p.savings) }));
  const svg = renderCumulativeSavingsSvg({
    title: `${meter.name}: cumulative avoided energy`,
    unit: meter.unit,
    yearStart: window.from,
    yearEnd: window.to,
    // A guarantee binds the facility, not one meter: it is drawn in the facility's contract-year chart.
    guaranteed: null,
    uncertainty: meter.energy?.uncertainty ?? null,
    points,
  });
  return chartFigure(
    'cumulative-savings',
    svg,
    `Avoided energy of this meter summed period by period across the reporting window, in ${meter.unit}; the band is the ± of the window's total.`,
  );
}

function signature(meter: MeterReport): string {
  const s = meter.signature;
  const b = meter.baseline;
  if (s === null || b === null)
    return tag(
      'p',
      { class: 'note', 'data-figure': 'signature-missing' },
      text('No energy-signature data for this meter.'),
    );
  const svg = renderSignatureSvg({
    meterName: meter.name,
    model: b.model,
    version: b.version,
    // The report only ever uses frozen baselines.
    status: 'frozen',
    baselineStart: b.start,
    baselineEnd: b.end,
    temperatureUnit: s.temperatureUnit,
    useUnit: meter.unit,
    baseline: s.baseline,
    fittedLine: s.fittedLine,
    reporting: s.reporting,
    temperatureForm: s.temperatureForm,
    expected: s.expected,
    reportingNetOfAdjustments: s.reportingNetOfAdjustments,
  });
  const net = s.reportingNetOfAdjustments
    ? ' Reporting periods are drawn net of their non-routine adjustments (actual − adjustment, per day), so each sits against the line as its avoided energy does.'
    : '';
  const caption =
    s.temperatureForm === 'daily'
      ? `Energy signature: use per day against mean outdoor temperature, baseline periods and this window's reporting periods around the frozen ${b.model} model's daily response (drawn over the daily temperatures it saw); a tick marks each bill's expected use, the daily response averaged over its own days.`
      : `Energy signature: use per day against mean outdoor temperature, baseline periods around the frozen ${b.model} model and this window's reporting periods.`;
  return chartFigure('signature', svg, caption + net);
}
