/**
 * The engine's public surface: what the CLI, the service and the reports
 * call. Pure computation: no HTTP, no SQL, no files, no clocks.
 *
 * Typical use:
 *   const problems = [...checkReadings(readings), ...checkWeather(weather, 'F')];
 *   const baseline = analyseBaseline(readings, weather);
 *   const savings = analyseSavings(baseline, reportingReadings, weather, { confidence: 0.9 });
 */
import type { AlignedPeriods, ExcludedPeriod, ModelName, Period, Reading } from './types.js';
import { alignPeriods, DEFAULT_MIN_COVERAGE, type AlignmentOptions, type DailyWeather } from './periods.js';
import { chooseBaseline, type BaselineChoice, type SelectionOptions } from './choose.js';
import { computeSavings, type SavingsOptions } from './savings.js';
import { calendarMonths } from './calendar-months.js';
import { cvrmseLimitForReportingMonths, guideline14Check, type Guideline14Limits } from './guideline14.js';
import type { ShapeFit } from './fit/fit-shape.js';
import { fitDocument, type FitDocument, type SavingsDocument } from './documents.js';
import { MIN_BASELINE_PERIODS, MIN_REPORTING_PERIODS, TooFewPeriodsError } from './errors.js';
import { applyExclusions, type Exclusion } from './exclusions.js';

export * from './types.js';
export {
  alignPeriods,
  indexWeather,
  DEFAULT_MIN_COVERAGE,
  missingWeatherDates,
  describeDateRanges,
  DayIndexedWeather,
  type AlignmentOptions,
  type DailyWeather,
} from './periods.js';
export { checkReadings, checkWeather } from './validate.js';
export type { InputProblem } from './input-problem.js';
export * from './bounds.js';
export {
  chooseBaseline,
  isUsableSignificanceLevel,
  nestedFTest,
  resolveTemperatureForm,
  OVERFIT_RATIO,
  DEFAULT_SIGNIFICANCE_LEVEL,
  DEFAULT_MIN_POINTS_PER_SEGMENT,
} from './choose.js';
export type {
  BaselineChoice,
  Candidate,
  SelectionOptions,
  Verdict,
  VariableDecision,
  VariableOverride,
} from './choose.js';
export * from './exclusions.js';
export {
  variableValues,
  predictWithVariables,
  designRowWithVariables,
  checkVariableValues,
} from './fit/variable-columns.js';
export { fitShape, fitTemperatureForm, periodsHaveDays } from './fit/fit-shape.js';
export type {
  ShapeFit,
  ShapeFitResult,
  ShapeFitFailure,
  Coefficient,
  ChangepointEstimate,
  FitStatistics,
} from './fit/fit-shape.js';
export {
  designRow,
  predictPerDay,
  periodDesignRow,
  predictPeriodPerDay,
  type PeriodWeather,
} from './fit/shape-model.js';
export { heatingDegreeDaysPerDay, coolingDegreeDaysPerDay } from './fit/degree-days.js';
export { computeSavings, CONFIDENCE_LEVELS, SIGNIFICANCE_RULE } from './savings.js';
export type { SavingsOptions, SavingsResult, SavingsPeriod, SavingsTotals, Uncertainty } from './savings.js';
export {
  DEFAULT_GUIDELINE14_LIMITS,
  GUIDELINE14_SOURCE,
  cvrmseLimitForReportingMonths,
  guideline14Check,
} from './guideline14.js';
export type { Guideline14Check, Guideline14Limits } from './guideline14.js';
export { candidateDocument, fitDocument } from './documents.js';
export type { CandidateDocument, FitDocument, SavingsDocument } from './documents.js';
export { daysBetween, addDays, isIsoDate, parseIsoDate } from './dates.js';
export { fahrenheitToCelsius, celsiusToFahrenheit, isPlausibleTemperature, unitSymbol } from './units.js';
export * from './energy-units.js';
export * from './adjustments.js';
export * from './rates.js';
export * from './rollup.js';
export * from './portfolio-correlation.js';
export * from './normal-year.js';
export * from './report-windows.js';
export * from './normalised.js';
export * from './sufficiency.js';
export * from './checked-savings.js';
export { twoSidedNormalQuantile } from './stats/distributions.js';
export * from './errors.js';

/** Average length of a calendar month in days (365.25 / 12): an average only; reporting months are counted by calendarMonths. */
export const DAYS_PER_MONTH = 365.25 / 12;
export { calendarMonths } from './calendar-months.js';

export interface BaselineAnalysis {
  periods: Period[];
  excluded: ExcludedPeriod[];
  choice: BaselineChoice;
  document: FitDocument;
}

export type BaselineOptions = AlignmentOptions &
  SelectionOptions & {
    /** Readings the engineer leaves out, each with its reason (exclusions.ts). */
    exclusions?: readonly Exclusion[];
  };

/**
 * Align baseline readings with weather, fit every shape and choose one.
 * Throws TooFewPeriodsError, carrying the readings left out and why, when
 * fewer than MIN_BASELINE_PERIODS periods are usable.
 */
export function analyseBaseline(
  readings: readonly Reading[],
  weather: DailyWeather,
  options: BaselineOptions = {},
): BaselineAnalysis {
  const { kept, applied } = applyExclusions(readings, options.exclusions ?? []);
  const aligned = alignPeriods(kept, weather, options);
  const { periods } = aligned;
  // Coverage exclusions name the reading's index in the caller's list, not in the list left after the engineer's exclusions.
  const original = readings
    .map((_, index) => index)
    .filter((index) => !applied.some((a) => a.start === readings[index]!.start && a.end === readings[index]!.end));
  const excluded = aligned.excluded.map((e) => ({ ...e, index: original[e.index] ?? e.index }));
  if (periods.length < MIN_BASELINE_PERIODS)
    throw new TooFewPeriodsError('baseline', MIN_BASELINE_PERIODS, periods.length, excluded);
  const choice = chooseBaseline(periods, options);
  return {
    periods,
    excluded,
    choice,
    document: fitDocument(choice, periods.length, excluded, options.minCoverage ?? DEFAULT_MIN_COVERAGE, applied),
  };
}

export interface ReportingOptions extends SavingsOptions, AlignmentOptions {
  /** Use this shape instead of the selected one (an engineer's override); it must have been fitted. */
  model?: ModelName;
  /** CV(RMSE) limit for the acceptance check; by default it follows the reporting length. */
  cvrmseLimit?: number;
}

/**
 * Savings of reporting-period readings against a baseline analysis. The
 * Guideline 14 CV(RMSE) limit follows the reporting length (see guideline14.ts).
 */
export function analyseSavings(
  baseline: BaselineAnalysis,
  reportingReadings: readonly Reading[],
  weather: DailyWeather,
  options: ReportingOptions = {},
): SavingsDocument {
  const model = options.model ?? baseline.choice.selected;
  const candidate = baseline.choice.candidates.find((c) => c.model === model);
  if (!candidate?.fit) throw new RangeError(`the ${model} shape could not be fitted to this baseline`);
  return savingsFromFit(
    candidate.fit,
    { limits: baseline.choice.settings.guideline14, excluded: baseline.excluded },
    reportingReadings,
    weather,
    options,
  );
}

export interface StoredBaselineContext {
  /** The Guideline 14 limits the baseline was judged by (the CV(RMSE) limit is reset by reporting length). */
  limits: Guideline14Limits;
  /** Baseline readings that were left out of the fit. */
  excluded: readonly ExcludedPeriod[];
}

/**
 * Savings of reporting-period readings against an already-fitted (for
 * example frozen and stored) model: no refit, the model is used as given.
 */
export function savingsFromFit(
  fit: ShapeFit,
  baseline: StoredBaselineContext,
  reportingReadings: readonly Reading[],
  weather: DailyWeather,
  options: SavingsOptions & AlignmentOptions & { cvrmseLimit?: number } = {},
): SavingsDocument {
  return savingsFromAligned(fit, baseline, alignPeriods(reportingReadings, weather, options), options);
}

/**
 * The same from readings already aligned with their weather (alignPeriods),
 * for callers that need the periods themselves too (the extrapolation check).
 * Throws TooFewPeriodsError (with the readings left out) when no reporting
 * period is usable, InvalidAdjustmentError for an adjustment that cannot be applied.
 */
export function savingsFromAligned(
  fit: ShapeFit,
  baseline: StoredBaselineContext,
  aligned: AlignedPeriods,
  options: SavingsOptions & { cvrmseLimit?: number } = {},
): SavingsDocument {
  const { periods, excluded } = aligned;
  if (periods.length < MIN_REPORTING_PERIODS)
    throw new TooFewPeriodsError('savings', MIN_REPORTING_PERIODS, periods.length, excluded);
  const result = computeSavings(fit, periods, options);
  // Calendar months, so a reporting year of 365 or 366 days is 12 months and judged by the 12–60-month limit.
  const reportingMonths = calendarMonths(periods);
  const limits = { ...baseline.limits, cvrmse: options.cvrmseLimit ?? cvrmseLimitForReportingMonths(reportingMonths) };
  return {
    ...result,
    baseline: {
      selected: fit.model,
      temperatureForm: result.temperatureForm,
      reportingMonths,
      guideline14: guideline14Check(fit.stats, limits),
    },
    excluded: { baseline: [...baseline.excluded], reporting: excluded },
  };
}
export * from './weather-gaps.js';
export * from './filled-days.js';
export * from './station-record.js';
export * from './normal-year-history.js';
export * from './variables.js';
export * from './calendar.js';
