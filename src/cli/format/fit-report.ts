/**
 * The plain-text report of `mvledger fit`: one row per candidate shape,
 * each candidate's reasons, the periods left out, and the Guideline 14
 * acceptance of the selected shape.
 */
import type { BaselineSufficiency, FitDocument, PeriodFills, TemperatureUnit } from '../../engine/index.js';
import { unitSymbol } from '../../engine/index.js';
import { CAUTION } from './caution.js';
import { guideline14Lines } from './guideline14-lines.js';
import { formatFixed, formatPercent, formatSignificant } from './numbers.js';
import { parameterLegend, parameterSummary } from './parameters.js';
import { renderTable } from './table.js';
import { describeTemperatureForm } from './savings-report.js';

export interface FitReportContext {
  readingsFile: string;
  weatherFile: string;
  weatherSource: string;
  unit: TemperatureUnit;
  minCoverage: number;
  /** File line of the reading with this index. */
  lineOf(index: number): number;
  /** Whether the baseline covers a full cycle of seasons. */
  sufficiency: BaselineSufficiency;
  /** The readings' periods with days filled on record (from the weather file's `filled` column). */
  weatherFills?: readonly PeriodFills[];
  /** Whether the weather file had a `filled` column at all (the section is printed only then). */
  filledColumn?: boolean;
}

/**
 * A candidate's verdict in words for people. The JSON keeps the engine's
 * codes; a shape that passed its checks but was not chosen is not
 * "accepted": it is a runner-up, and the text says so.
 */
export function verdictText(verdict: FitDocument['candidates'][number]['verdict']): string {
  switch (verdict) {
    case 'selected':
      return 'selected';
    case 'accepted':
      return 'passed, not chosen';
    case 'rejected':
      return 'rejected';
    default:
      return verdict.replace(/-/g, ' ');
  }
}

export function renderFitReport(document: FitDocument, context: FitReportContext): string {
  const symbol = unitSymbol(context.unit);
  const excluded = document.periods.excluded;
  const settings = document.settings;
  const lines: string[] = [
    'Baseline fit',
    `  readings: ${context.readingsFile} (${document.periods.used} periods used, ${excluded.length} left out)`,
    `  weather:  ${context.weatherFile} (daily mean from ${context.weatherSource}, ${symbol})`,
    `  settings: α = ${settings.significanceLevel}, at least ${settings.minPointsPerSegment} points per segment, weather coverage at least ${formatPercent(context.minCoverage, 0)}`,
    `  temperature form: ${describeTemperatureForm(document.temperatureForm)}`,
    `  baseline length: ${context.sufficiency.periods} periods, ${context.sufficiency.days} days: ${
      context.sufficiency.sufficient
        ? 'covers a full cycle of seasons'
        : `too short to project from (${context.sufficiency.reasons.join('; ')}); \`mvledger savings\` refuses it without --allow-short-baseline REASON`
    }`,
    '',
    `Selected shape: ${document.selected}`,
    '',
  ];

  const rows = document.candidates.map((c) => [
    c.model,
    verdictText(c.verdict),
    String(c.n),
    String(c.p),
    formatFixed(c.stats?.r2, 3),
    formatFixed(c.stats ? c.stats.cvrmse * 100 : null, 2),
    formatFixed(c.stats ? c.stats.nmbe * 100 : null, 3),
    formatFixed(c.stats?.outOfSample ? c.stats.outOfSample.cvrmse * 100 : null, 2) + (c.overFitted ? ' !' : ''),
    formatFixed(c.stats?.outOfSample ? c.stats.outOfSample.nmbe * 100 : null, 3),
    formatFixed(c.stats?.durbinWatson, 2),
    formatSse(c.sse),
    parameterSummary(c.parameters, symbol),
  ]);
  lines.push(
    ...renderTable(
      [
        { title: 'Model', align: 'left' },
        { title: 'Verdict', align: 'left' },
        { title: 'n', align: 'right' },
        { title: 'p', align: 'right' },
        { title: 'R²', align: 'right' },
        { title: 'CV(RMSE) %', align: 'right' },
        { title: 'NMBE %', align: 'right' },
        { title: 'out of sample: CV(RMSE) %', align: 'right' },
        { title: 'NMBE %', align: 'right' },
        { title: 'Durbin–Watson', align: 'right' },
        { title: 'SSE', align: 'right' },
        { title: 'Parameters', align: 'left' },
      ],
      rows,
    ),
    parameterLegend(symbol),
    '  Out of sample: each bill predicted without itself (daily data: without its calendar month), changepoints held; ! = flagged as over-fitted.',
    '  Durbin–Watson of the residuals in time order: near 2 when they are uncorrelated, well below 2 when neighbours move together.',
    '  Verdicts: selected = the shape chosen; passed, not chosen = passed its checks, but the sequence of tests chose another; rejected = failed a check (reasons below).',
    '',
    'Reasons',
  );
  for (const c of document.candidates) {
    lines.push(`  ${c.model} (${verdictText(c.verdict)})`, ...c.reasons.map((reason) => `    - ${reason}`));
  }

  lines.push('', 'Periods left out of the fit');
  if (excluded.length === 0) lines.push('  none');
  const rowWidth = Math.max(0, ...excluded.map((period) => String(context.lineOf(period.index)).length));
  for (const period of excluded) {
    lines.push(
      `  row ${String(context.lineOf(period.index)).padStart(rowWidth)}  ${period.start} to ${period.end}: ${period.reason}`,
    );
  }
  const exclusions = document.exclusions ?? [];
  if (exclusions.length > 0) {
    lines.push('', 'Readings left out by the engineer');
    for (const e of exclusions) lines.push(`  ${e.start} to ${e.end} (quantity ${e.quantity}): ${e.reason}`);
  }

  if (context.filledColumn) {
    const fills = context.weatherFills ?? [];
    lines.push('', 'Periods whose weather was filled on record');
    if (fills.length === 0) lines.push('  none');
    else
      lines.push(
        ...renderTable(
          [
            { title: 'Period', align: 'left' },
            { title: 'Days', align: 'right' },
            { title: 'Filled', align: 'left' },
          ],
          fills.map((f) => [`${f.start} to ${f.end}`, String(f.days), f.summary]),
        ).map((line) => `  ${line}`),
      );
  }

  const selected = document.candidates.find((c) => c.model === document.selected);
  lines.push(
    '',
    ...guideline14Lines(
      selected?.guideline14 ?? null,
      `Guideline 14 acceptance of the selected shape (${document.selected})`,
    ),
    '  The CV(RMSE) limit here is the one for under 12 reporting months; `mvledger savings` applies the limit for the reporting length.',
    '',
    CAUTION,
  );
  return `${lines.join('\n')}\n`;
}

/** SSE grows with the square of the meter's unit: whole numbers once it is large, significant digits when small. */
function formatSse(sse: number | null): string {
  return sse !== null && Math.abs(sse) >= 100 ? formatFixed(sse, 0) : formatSignificant(sse);
}
