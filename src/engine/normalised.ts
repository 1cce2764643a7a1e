/**
 * Normalised savings: the frozen baseline model and a reporting-period model
 * (fitted the same way, to the reporting readings) both applied to a normal
 * year of weather; the difference is what the measures save in a typical
 * year, free of the reporting year's own weather.
 *
 * The reporting-period model is fitted in the baseline's temperature form.
 * A day-resolved model is a daily response, so it meets the normal year day
 * by day; a mean-form model fitted to bills has only seen period means and
 * meets it as calendar months.
 */
import { TooFewPeriodsError } from './errors.js';
import type { Reading } from './types.js';
import { fitTemperatureForm, type ShapeFit } from './fit/fit-shape.js';
import { alignPeriods, type DailyWeather } from './periods.js';
import { chooseBaseline } from './choose.js';
import { normalPeriodsUse, normalYearMonths, type NormalPeriod } from './normal-year.js';
import { designRow } from './fit/shape-model.js';
import { quadraticForm } from './fit/matrix.js';
import { effectiveSampleSize } from './stats/savings-uncertainty.js';
import { twoSidedTCritical } from './stats/distributions.js';

/**
 * A reporting-period model needs a full cycle of seasons before it says
 * anything about a typical year: at least 330 days of usable reporting
 * periods (common practice: about eleven months of a year's bills).
 */
export const MIN_NORMALISED_REPORTING_DAYS = 330;

/** Readings this long or longer (median days) are bills: the normal year is applied as calendar months, else day by day. */
export const BILLING_PERIOD_DAYS = 7;

export type NormalisedResult =
  | {
      available: true;
      baselineUse: number;
      reportingUse: number;
      savings: number;
      fractionSaved: number | null;
      reportingModel: string;
      reportingPeriods: number;
      /** How the normal year was fed to the models: day by day (day-resolved models, daily data) or as calendar months (mean-form models of bills). */
      normalYearAs: 'months' | 'days';
      outsideRangeShare: number;
      /**
       * The band of the normalised saving: both models' prediction variance
       * of their normal-year use (each (n/n′)·σ²·cᵀ(XᵀWX)⁻¹c, c the sum of
       * the normal year's design rows), added, at the stated confidence.
       * Parameter uncertainty only: a typical year has no noise of its own.
       */
      uncertainty: { confidence: number; absolute: number; fractional: number | null };
    }
  | { available: false; reason: string };

export function normalisedSavings(
  baseline: ShapeFit,
  reportingReadings: readonly Reading[],
  weather: DailyWeather,
  normalTemps: readonly number[],
  options: { minCoverage?: number; confidence?: number } = {},
): NormalisedResult {
  if (baseline.variables && baseline.variables.length > 0) {
    return {
      available: false,
      reason: `the baseline model carries the variables ${baseline.variables.join(', ')}; a normal year states weather only, not typical values of them`,
    };
  }
  const { periods } = alignPeriods(reportingReadings, weather, options);
  const days = periods.reduce((total, p) => total + p.days, 0);
  if (days < MIN_NORMALISED_REPORTING_DAYS) {
    return {
      available: false,
      reason: `the window holds ${days} days of usable reporting periods; a reporting-period model needs at least ${MIN_NORMALISED_REPORTING_DAYS} (a full cycle of seasons)`,
    };
  }
  const form = fitTemperatureForm(baseline);
  let choice;
  try {
    choice = chooseBaseline(periods, { temperatureForm: form });
  } catch (error) {
    if (error instanceof TooFewPeriodsError)
      return { available: false, reason: `no reporting-period model: ${error.message}` };
    throw error;
  }
  const reportingFit = choice.candidates.find((c) => c.model === choice.selected)?.fit;
  if (!reportingFit)
    return { available: false, reason: 'no changepoint shape could be fitted to the reporting periods' };
  const lengths = periods.map((p) => p.days).sort((a, b) => a - b);
  const asMonths = form === 'mean' && (lengths[Math.floor(lengths.length / 2)] ?? 1) >= BILLING_PERIOD_DAYS;
  const normal: NormalPeriod[] = asMonths
    ? normalYearMonths(normalTemps)
    : normalTemps.map((meanTemp) => ({ days: 1, meanTemp }));
  // Days of the normal year outside either model's range, counted by the period the model sees.
  const base = normalPeriodsUse(baseline, normal);
  const reporting = normalPeriodsUse(reportingFit, normal);
  const outside = normal
    .filter(
      (p) =>
        p.meanTemp < baseline.temperatureRange.min ||
        p.meanTemp > baseline.temperatureRange.max ||
        p.meanTemp < reportingFit.temperatureRange.min ||
        p.meanTemp > reportingFit.temperatureRange.max,
    )
    .reduce((days, p) => days + p.days, 0);
  const savings = base.use - reporting.use;
  const confidence = options.confidence ?? 0.68;
  const variance = normalUseVariance(baseline, normal) + normalUseVariance(reportingFit, normal);
  const t = twoSidedTCritical(confidence, Math.min(baseline.n - baseline.p, reportingFit.n - reportingFit.p));
  const absolute = t * Math.sqrt(variance);
  return {
    available: true,
    baselineUse: base.use,
    reportingUse: reporting.use,
    savings,
    fractionSaved: base.use !== 0 ? savings / base.use : null,
    reportingModel: reportingFit.model,
    reportingPeriods: periods.length,
    normalYearAs: asMonths ? 'months' : 'days',
    outsideRangeShare: normalTemps.length > 0 ? outside / normalTemps.length : 0,
    uncertainty: { confidence, absolute, fractional: savings !== 0 ? absolute / Math.abs(savings) : null },
  };
}

/**
 * Variance of a model's predicted use over the normal year's periods:
 * (n/n′)·σ²·cᵀ(XᵀWX)⁻¹c with c = Σ days × design row (changepoints held
 * where the fit put them), as for the exact savings variance but with no
 * noise term.
 */
function normalUseVariance(fit: ShapeFit, periods: readonly NormalPeriod[]): number {
  const width = fit.unscaledCovariance.length;
  const c = new Array<number>(width).fill(0);
  for (const period of periods) {
    const row = designRow(fit.model, fit.changepoints, period.meanTemp);
    for (let j = 0; j < width; j++) c[j]! += period.days * row[j]!;
  }
  const nOverNPrime = fit.n / effectiveSampleSize(fit.n, fit.stats.autocorrelation);
  return nOverNPrime * fit.residualVariance * quadraticForm(fit.unscaledCovariance, c);
}
