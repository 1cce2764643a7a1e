/**
 * Normalised savings: the frozen baseline model and a reporting-period model
 * (fitted the same way, to the reporting readings) both applied to a normal
 * year of weather; the difference is what the measures save in a typical
 * year, free of the reporting year's own weather.
 */
import type { DailyTemperature, Reading } from './types.js';
import type { ShapeFit } from './fit/fit-shape.js';
import { alignPeriods } from './periods.js';
import { chooseBaseline } from './choose.js';
import { normalYearUse } from './normal-year.js';

/**
 * A reporting-period model needs a full cycle of seasons before it says
 * anything about a typical year: at least 330 days of usable reporting
 * periods (common practice: about eleven months of a year's bills).
 */
export const MIN_NORMALISED_REPORTING_DAYS = 330;

export type NormalisedResult =
  | {
      available: true;
      baselineUse: number;
      reportingUse: number;
      savings: number;
      fractionSaved: number | null;
      reportingModel: string;
      reportingPeriods: number;
      outsideRangeShare: number;
    }
  | { available: false; reason: string };

export function normalisedSavings(
  baseline: ShapeFit,
  reportingReadings: readonly Reading[],
  weather: readonly DailyTemperature[] | ReadonlyMap<string, number>,
  normalTemps: readonly number[],
  options: { minCoverage?: number } = {},
): NormalisedResult {
  const { periods } = alignPeriods(reportingReadings, weather, options);
  const days = periods.reduce((total, p) => total + p.days, 0);
  if (days < MIN_NORMALISED_REPORTING_DAYS) {
    return {
      available: false,
      reason: `the window holds ${days} days of usable reporting periods; a reporting-period model needs at least ${MIN_NORMALISED_REPORTING_DAYS} (a full cycle of seasons)`,
    };
  }
  let choice;
  try {
    choice = chooseBaseline(periods);
  } catch (error) {
    if (error instanceof RangeError) return { available: false, reason: `no reporting-period model: ${error.message}` };
    throw error;
  }
  const reportingFit = choice.candidates.find((c) => c.model === choice.selected)?.fit;
  if (!reportingFit) return { available: false, reason: 'no changepoint shape could be fitted to the reporting periods' };
  const base = normalYearUse(baseline, normalTemps);
  const reporting = normalYearUse(reportingFit, normalTemps);
  const outside = normalTemps.filter(
    (t) => t < baseline.temperatureRange.min || t > baseline.temperatureRange.max || t < reportingFit.temperatureRange.min || t > reportingFit.temperatureRange.max,
  ).length;
  const savings = base.use - reporting.use;
  return {
    available: true,
    baselineUse: base.use,
    reportingUse: reporting.use,
    savings,
    fractionSaved: base.use !== 0 ? savings / base.use : null,
    reportingModel: reportingFit.model,
    reportingPeriods: periods.length,
    outsideRangeShare: normalTemps.length > 0 ? outside / normalTemps.length : 0,
  };
}
