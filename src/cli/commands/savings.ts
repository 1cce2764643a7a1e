/** `mvledger savings`: avoided energy of the reporting readings against the baseline fit. */
import {
  TooFewPeriodsError,
  MissingVariableValuesError,
  alignPeriods,
  analyseSavings,
  baselineSufficiency,
  projectionRefusals,
  reportingExtrapolation,
  withProjectionChecks,
  type BaselineAnalysis,
  type CheckedSavingsDocument,
  type ProjectionOverrides,
  type SavingsDocument,
  type ShapeFit,
} from '../../engine/index.js';
import { UsageError } from '../errors.js';
import type { SavingsCommandOptions } from '../options.js';
import { loadReadings, type ReadingsFile } from '../input/readings-file.js';
import { loadWeather, type WeatherFile } from '../input/weather-file.js';
import { toJsonDocument } from '../format/json.js';
import { renderSavingsReport } from '../format/savings-report.js';
import { fitBaseline, lineLookup } from './baseline.js';
import { loadVariables, explainMissingValues, type VariablesFile } from '../input/variables-file.js';
import { explainTooFewPeriods } from './too-few-periods.js';

/** The option that passes each check over, for the refusal's hint. */
const OVERRIDE_OPTION = {
  shortBaseline: '--allow-short-baseline REASON',
  extrapolation: '--allow-extrapolation REASON',
} as const;

/** The command's whole stdout text; throws on bad input so nothing is printed halfway. */
export async function runSavings(options: SavingsCommandOptions): Promise<string> {
  const baselineReadings = await loadReadings(options.baseline);
  const reportingReadings = await loadReadings(options.reporting);
  const weather = await loadWeather(options.weather, options.unit);
  const variables = options.variables === null ? null : await loadVariables(options.variables);
  const baseline = fitBaseline(baselineReadings, weather, options, [], variables);
  const model = options.model ?? baseline.choice.selected;
  const used = baseline.choice.candidates.find((c) => c.model === model);
  if (!used?.fit) {
    throw new UsageError(
      `--model ${model}: the ${model} shape could not be fitted to this baseline (${used?.reasons.join('; ') ?? 'not a candidate'})`,
    );
  }
  const plain = computeSavingsDocument(baseline, reportingReadings, weather, options, model, variables);
  const document = checkProjection(plain, baseline, used.fit, reportingReadings, weather, options);
  if (options.json) return toJsonDocument(document);
  return renderSavingsReport(document, {
    baselineFile: baselineReadings.file,
    reportingFile: reportingReadings.file,
    weatherFile: weather.file,
    weatherSource: weather.source,
    unit: weather.unit,
    selectedByFit: baseline.choice.selected,
    usedVerdict: used.verdict,
    baselineLineOf: lineLookup(baselineReadings),
    reportingLineOf: lineLookup(reportingReadings),
  });
}

/**
 * The checks between the baseline and its projection: a baseline shorter
 * than a full cycle of seasons, or reporting weather beyond the
 * extrapolation limit, is refused (exit 2, the reasons on one line) unless
 * its --allow-… option gives a reason; the document states both checks and
 * every override given.
 */
function checkProjection(
  document: SavingsDocument,
  baseline: BaselineAnalysis,
  fit: ShapeFit,
  reporting: ReadingsFile,
  weather: WeatherFile,
  options: SavingsCommandOptions,
): CheckedSavingsDocument {
  const overrides: ProjectionOverrides = {
    shortBaseline: options.allowShortBaseline === null ? null : { reason: options.allowShortBaseline },
    extrapolation: options.allowExtrapolation === null ? null : { reason: options.allowExtrapolation },
  };
  const checks = {
    sufficiency: baselineSufficiency(baseline.periods),
    extrapolation: reportingExtrapolation(
      fit,
      alignPeriods(reporting.readings, weather.weather, { minCoverage: options.minCoverage }).periods,
    ),
    overrides,
  };
  const refusals = projectionRefusals(checks, { requireSufficiency: true });
  if (refusals.length > 0) {
    const hints = refusals.map((r) => OVERRIDE_OPTION[r.check]).join(' and ');
    throw new UsageError(
      `savings refused: ${refusals.map((r) => r.reason).join('; ')}; give ${hints} to project anyway`,
    );
  }
  return withProjectionChecks(document, checks);
}

function computeSavingsDocument(
  baseline: BaselineAnalysis,
  reporting: ReadingsFile,
  weather: WeatherFile,
  options: SavingsCommandOptions,
  model: NonNullable<SavingsCommandOptions['model']>,
  variables: VariablesFile | null,
): SavingsDocument {
  try {
    return analyseSavings(baseline, reporting.readings, weather.weather, {
      confidence: options.confidence,
      model,
      minCoverage: options.minCoverage,
      variableSeries: variables?.series ?? [],
    });
  } catch (error) {
    if (error instanceof MissingVariableValuesError)
      throw explainMissingValues(error, variables, `reporting readings ${reporting.file}`);
    throw error instanceof TooFewPeriodsError ? explainTooFewPeriods(reporting, weather, error) : error;
  }
}
