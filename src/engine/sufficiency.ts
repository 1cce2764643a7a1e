/**
 * Is a baseline fit to project from? Two checks, both stated in words:
 *
 * - Sufficiency: a baseline must cover a full cycle of seasons, or the
 *   model has never seen part of the year it will be asked about. The rule
 *   is common practice, not a standard: at least 330 days of usable periods
 *   and, for billed meters, at least 12 bills (a full year of bills).
 * - Extrapolation: the share of a reporting period's days whose weather lies
 *   outside what the baseline saw. A regression says nothing reliable
 *   outside the range it was fitted on; past a limit (10% of the reporting
 *   days by default, a limit of our own) the projection is refused unless
 *   someone accountable overrides it with a reason.
 *
 * Pure: the caller decides what a failed check means (a refused freeze, a
 * refused savings figure, a meter left out of a report).
 */
import type { Period } from './types.js';
import { fitTemperatureForm, type ShapeFit } from './fit/fit-shape.js';

/** Fewest days of usable baseline periods: a full cycle of seasons (common practice: a full year of bills). */
export const MIN_BASELINE_DAYS = 330;
/** Fewest usable bills in a billed baseline (common practice: a full year of bills). */
export const MIN_BASELINE_BILLS = 12;
/** A baseline whose median period is this many days or more is read in bills (the same cut as normalised savings). */
export const BILLED_MEDIAN_DAYS = 7;
export const BASELINE_SUFFICIENCY_SOURCE =
  'common practice: a full year of bills (a full cycle of seasons); not a published standard';

/** Largest share of reporting days outside the baseline's weather before a projection is refused (a limit of our own; configurable). */
export const DEFAULT_EXTRAPOLATION_LIMIT = 0.1;
export const EXTRAPOLATION_LIMIT_SOURCE = 'a limit of our own, not a published standard';

export interface BaselineSufficiency {
  /** True when every rule is met. */
  sufficient: boolean;
  /** Each unmet rule in words, with the numbers; empty when sufficient. */
  reasons: string[];
  /** Usable periods and their days. */
  periods: number;
  days: number;
  /** Median period of BILLED_MEDIAN_DAYS or more: the bill-count rule applies. */
  billed: boolean;
  rule: { minDays: number; minBills: number; source: string };
}

/**
 * Does a baseline of these (usable, aligned) periods cover a full cycle of
 * seasons? At least MIN_BASELINE_DAYS days of periods and, when the
 * periods are bills (median length of BILLED_MEDIAN_DAYS days or more), at
 * least MIN_BASELINE_BILLS of them.
 */
export function baselineSufficiency(periods: readonly Pick<Period, 'days'>[]): BaselineSufficiency {
  const days = periods.reduce((sum, period) => sum + period.days, 0);
  const lengths = periods.map((period) => period.days).sort((a, b) => a - b);
  const billed = (lengths[Math.floor(lengths.length / 2)] ?? 0) >= BILLED_MEDIAN_DAYS;
  const reasons: string[] = [];
  if (days < MIN_BASELINE_DAYS) {
    reasons.push(
      `the baseline's usable periods cover ${days} days; a full cycle of seasons needs at least ${MIN_BASELINE_DAYS} (${BASELINE_SUFFICIENCY_SOURCE})`,
    );
  }
  if (billed && periods.length < MIN_BASELINE_BILLS) {
    reasons.push(
      `the baseline has ${periods.length} usable bills; at least ${MIN_BASELINE_BILLS} are needed (${BASELINE_SUFFICIENCY_SOURCE})`,
    );
  }
  return {
    sufficient: reasons.length === 0,
    reasons,
    periods: periods.length,
    days,
    billed,
    rule: { minDays: MIN_BASELINE_DAYS, minBills: MIN_BASELINE_BILLS, source: BASELINE_SUFFICIENCY_SOURCE },
  };
}

export interface ReportingExtrapolation {
  /** Share of the reporting days whose weather lies outside what the baseline saw (0..1). */
  share: number;
  /** Those days, and the days counted. */
  outsideDays: number;
  days: number;
  /**
   * What "outside" was judged on: 'daily' (a day-resolved fit: each day's
   * temperature against the daily range the model saw) or 'mean' (a
   * mean-form fit: each period's mean against the range of baseline means).
   */
  basis: 'daily' | 'mean';
  /** The baseline's range on that basis. */
  range: { min: number; max: number };
  limit: number;
  /** share > limit. */
  exceedsLimit: boolean;
  /** The check in words, with the numbers. */
  summary: string;
}

/**
 * The share of the reporting days whose weather lies outside what the
 * baseline saw, judged in the fit's own form:
 * - day-resolved fits: days whose daily temperature lies outside
 *   fit.dayTemperatureRange, counted among the days that have weather;
 * - mean-form fits: all days of the periods whose mean temperature lies
 *   outside fit.temperatureRange (the model only ever saw period means).
 * `limit` (default DEFAULT_EXTRAPOLATION_LIMIT) is a share in [0, 1].
 */
export function reportingExtrapolation(
  fit: Pick<ShapeFit, 'temperatureRange' | 'temperatureForm' | 'dayTemperatureRange'>,
  reporting: readonly Pick<Period, 'days' | 'meanTemp' | 'dayTemps'>[],
  limit: number = DEFAULT_EXTRAPOLATION_LIMIT,
): ReportingExtrapolation {
  if (!(limit >= 0 && limit <= 1))
    throw new RangeError(`the extrapolation limit must be a share in [0, 1], got ${limit}`);
  const basis = fitTemperatureForm(fit) === 'daily' ? 'daily' : 'mean';
  const range = basis === 'daily' ? (fit.dayTemperatureRange ?? fit.temperatureRange) : fit.temperatureRange;
  const outside = (temp: number) => temp < range.min || temp > range.max;
  let days = 0;
  let outsideDays = 0;
  for (const period of reporting) {
    if (basis === 'daily' && period.dayTemps && period.dayTemps.length > 0) {
      days += period.dayTemps.length;
      for (const temp of period.dayTemps) if (outside(temp)) outsideDays++;
    } else {
      days += period.days;
      if (outside(period.meanTemp)) outsideDays += period.days;
    }
  }
  const share = days > 0 ? outsideDays / days : 0;
  const exceedsLimit = share > limit;
  const what =
    basis === 'daily'
      ? `had a daily temperature outside the ${round(range.min)} to ${round(range.max)} the baseline saw day by day`
      : `lie in periods whose mean temperature is outside the baseline's range of period means, ${round(range.min)} to ${round(range.max)}`;
  const summary = `${percent(share)} of the reporting days (${outsideDays} of ${days}) ${what}; the limit is ${percent(limit)} (${EXTRAPOLATION_LIMIT_SOURCE})`;
  return { share, outsideDays, days, basis, range: { ...range }, limit, exceedsLimit, summary };
}

function round(value: number): string {
  return Number.isFinite(value) ? value.toFixed(1) : String(value);
}

function percent(share: number): string {
  return `${(share * 100).toFixed(1)}%`;
}
