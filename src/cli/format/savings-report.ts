/**
 * The plain-text report of `mvledger savings`: a row per reporting period,
 * the totals with both uncertainties at the chosen confidence, the
 * significance verdict, the extrapolation share and the baseline's
 * Guideline 14 acceptance.
 */
import type {
  CheckedSavingsDocument,
  ExcludedPeriod,
  ModelName,
  TemperatureForm,
  TemperatureUnit,
  Verdict,
} from '../../engine/index.js';
import { unitSymbol } from '../../engine/index.js';
import { CAUTION } from './caution.js';
import { guideline14Lines } from './guideline14-lines.js';
import { formatFixed, formatPercent, formatSignificant, quantityDecimals } from './numbers.js';
import { renderTable } from './table.js';

export interface SavingsReportContext {
  baselineFile: string;
  reportingFile: string;
  weatherFile: string;
  weatherSource: string;
  unit: TemperatureUnit;
  /** The shape the baseline fit selected, and the verdict of the shape used when it was overridden. */
  selectedByFit: ModelName;
  usedVerdict: Verdict;
  baselineLineOf(index: number): number;
  reportingLineOf(index: number): number;
}

const OUTSIDE_MARK = '*';

/** The form in words, as the text reports state it. */
export function describeTemperatureForm(form: TemperatureForm): string {
  return form === 'daily'
    ? 'daily (day-resolved: each bill against the mean over its days of the daily response, the variable-base degree-day method)'
    : 'mean (each period at its mean temperature)';
}

export function renderSavingsReport(document: CheckedSavingsDocument, context: SavingsReportContext): string {
  const symbol = unitSymbol(context.unit);
  const totals = document.totals;
  const range = document.baselineTemperatureRange;
  const decimals = quantityDecimals(document.periods.flatMap((p) => [p.actual, p.adjustedBaseline]));
  const amount = (value: number) => formatFixed(value, decimals);
  const confidence = formatPercent(totals.confidence, 0);

  const modelNote =
    document.model === context.selectedByFit
      ? 'the shape the baseline fit selected'
      : `override: the baseline fit selected ${context.selectedByFit}; ${document.model} was ${context.usedVerdict} there`;
  const lines: string[] = [
    'Avoided energy',
    `  baseline:  ${context.baselineFile}, model ${document.model} (${modelNote})`,
    `  temperature form: ${describeTemperatureForm(document.temperatureForm)}`,
    `  reporting: ${context.reportingFile} (${document.periods.length} periods, ${document.excluded.reporting.length} left out)`,
    `  weather:   ${context.weatherFile} (daily mean from ${context.weatherSource}, ${symbol})`,
    '',
  ];

  const rows = document.periods.map((p) => [
    p.start,
    p.end,
    String(p.days),
    formatFixed(p.meanTemp, 1) + (p.outsideBaselineRange ? OUTSIDE_MARK : ' '),
    amount(p.actual),
    amount(p.adjustedBaseline),
    amount(p.savings),
  ]);
  const totalDays = document.periods.reduce((days, p) => days + p.days, 0);
  rows.push([
    'Total',
    '',
    String(totalDays),
    '',
    amount(totals.actual),
    amount(totals.adjustedBaseline),
    amount(totals.savings),
  ]);
  lines.push(
    ...renderTable(
      [
        { title: 'Start', align: 'left' },
        { title: 'End', align: 'left' },
        { title: 'Days', align: 'right' },
        { title: `Mean ${symbol} `, align: 'right' },
        { title: 'Actual', align: 'right' },
        { title: 'Adjusted baseline', align: 'right' },
        { title: 'Savings', align: 'right' },
      ],
      rows,
    ),
    `${OUTSIDE_MARK} mean temperature outside the baseline's range (${formatFixed(range.min, 1)} to ${formatFixed(range.max, 1)} ${symbol}): the model extrapolates there`,
    '',
  );

  const g14 = totals.uncertainty.guideline14;
  const exact = totals.uncertainty.exact;
  const combined = totals.uncertainty.combined;
  const adjustmentsAbsolute = totals.uncertainty.adjustments.absolute;
  const inputs = document.uncertaintyInputs;
  const at68 = document.significance.fractionalAt68;
  const width = Math.max(
    ...[totals.adjustedBaseline, totals.actual, totals.savings, g14.absolute, exact.absolute].map(
      (v) => amount(v).length,
    ),
  );
  const column = (value: number) => amount(value).padStart(width);
  lines.push(
    'Totals',
    `  Adjusted baseline               ${column(totals.adjustedBaseline)}`,
    `  Actual                          ${column(totals.actual)}`,
    `  Avoided energy                  ${column(totals.savings)}  (${formatPercent(totals.fractionSaved)} of the adjusted baseline)`,
    `  Uncertainty at ${confidence} confidence:`,
    `    Guideline 14 Annex B formula  ±${column(g14.absolute)}  (${formatPercent(g14.fractional)} of the savings)`,
    `    Exact regression variance     ±${column(exact.absolute)}  (${formatPercent(exact.fractional)} of the savings)`,
    ...(adjustmentsAbsolute > 0
      ? [
          `    Non-routine adjustments       ±${column(adjustmentsAbsolute)}  (their stated ±)`,
          `    Combined                      ±${column(combined.absolute)}  (${formatPercent(combined.fractional)} of the savings; the larger model ± and the adjustments' in quadrature)`,
        ]
      : []),
    `  Significance: ${totals.significant ? 'the savings are meaningful' : 'the savings are NOT distinguishable from their uncertainty'}` +
      ` (at 68% confidence: ${formatPercent(at68.guideline14)} Annex B, ${formatPercent(at68.exact)} exact; the test needs under 50%)`,
    `    Rule: ${document.significance.rule}`,
    `  Extrapolation: ${formatPercent(totals.outsideRangeShare)} of the adjusted baseline comes from periods outside the baseline's temperature range`,
    `    ${document.extrapolation.summary}`,
    `  Formula inputs: n = ${inputs.n}, n′ = ${formatSignificant(inputs.nPrime)}, m = ${inputs.m}, p = ${inputs.p}, t = ${formatFixed(inputs.t, 3)},` +
      ` lag-1 autocorrelation ${formatFixed(inputs.autocorrelation, 3)}, CV(RMSE) ${formatPercent(inputs.cvrmse, 2)}`,
    '',
    ...guideline14Lines(
      document.baseline.guideline14,
      `Guideline 14 acceptance of the ${document.model} baseline (${formatFixed(document.baseline.reportingMonths, 1)} reporting months)`,
    ),
    '',
    ...checkLines(document),
    '',
    'Periods left out',
    ...excludedLines('baseline', document.excluded.baseline, context.baselineFile, context.baselineLineOf),
    ...excludedLines('reporting', document.excluded.reporting, context.reportingFile, context.reportingLineOf),
    '',
    CAUTION,
  );
  return `${lines.join('\n')}\n`;
}

/** The checks between baseline and projection, and every override given with its reason. */
function checkLines(document: CheckedSavingsDocument): string[] {
  const s = document.baseline.sufficiency;
  const { shortBaseline, extrapolation } = document.baseline.overrides;
  const length = s.sufficient ? 'covers a full cycle of seasons' : `too short: ${s.reasons.join('; ')}`;
  const lines = ['Checks', `  Baseline length: ${s.periods} periods, ${s.days} days: ${length}`];
  lines.push(
    `  Extrapolation: ${document.extrapolation.exceedsLimit ? 'above' : 'within'} the limit of ${formatPercent(document.extrapolation.limit, 0)} of the reporting days`,
  );
  if (shortBaseline === null && extrapolation === null) lines.push('  Overrides: none');
  if (shortBaseline !== null)
    lines.push(`  Override --allow-short-baseline${s.sufficient ? ' (not needed here)' : ''}: ${shortBaseline.reason}`);
  if (extrapolation !== null)
    lines.push(
      `  Override --allow-extrapolation${document.extrapolation.exceedsLimit ? '' : ' (not needed here)'}: ${extrapolation.reason}`,
    );
  return lines;
}

function excludedLines(
  label: string,
  excluded: readonly ExcludedPeriod[],
  file: string,
  lineOf: (index: number) => number,
): string[] {
  if (excluded.length === 0) return [`  ${label}: none`];
  const rowWidth = Math.max(...excluded.map((period) => String(lineOf(period.index)).length));
  return [
    `  ${label} (${file}):`,
    ...excluded.map(
      (period) =>
        `    row ${String(lineOf(period.index)).padStart(rowWidth)}  ${period.start} to ${period.end}: ${period.reason}`,
    ),
  ];
}
