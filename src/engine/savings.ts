/**
 * Avoided energy: project the frozen baseline onto reporting-period weather.
 *
 * Adjusted baseline per period = days × f(period) + the non-routine
 * adjustments falling in the period, where f(period) is the frozen model's
 * use per day in the form it was fitted in: the mean over the period's days
 * of the daily response (day-resolved), or the response at the period's mean
 * temperature (mean form); avoided energy S = Σ adjusted baseline
 * − Σ actual; fraction saved F = S / Σ adjusted baseline. The model's
 * uncertainty of S is stated two ways (see stats/savings-uncertainty.ts):
 * the ASHRAE Guideline 14 Annex B formula and the exact regression variance
 * with the changepoints held fixed. Non-routine adjustments move S; an
 * adjustment the engineer gave a standard uncertainty adds its own ±
 * (adjustments.ts: the share inside the reporting periods, the adjustments
 * in quadrature, scaled to the confidence by the normal quantile), shown
 * separately and combined in quadrature with the larger of the model's two.
 */
import { MIN_REPORTING_PERIODS, TooFewPeriodsError } from './errors.js';
import type { ModelName, Period, TemperatureForm } from './types.js';
import { fitTemperatureForm, type ShapeFit } from './fit/fit-shape.js';
import {
  checkVariableValues,
  designRowWithVariables,
  fitVariables,
  predictWithVariables,
} from './fit/variable-columns.js';
import { twoSidedTCritical } from './stats/distributions.js';
import {
  effectiveSampleSize,
  exactSavingsVariance,
  guideline14FractionalUncertainty,
} from './stats/savings-uncertainty.js';
import { adjustmentsForPeriod, adjustmentsUncertaintyInPeriods, type NonRoutineAdjustment } from './adjustments.js';
import { twoSidedNormalQuantile } from './stats/distributions.js';
import { combineInQuadrature } from './rollup.js';

/** Confidence levels offered to users (two-sided). */
export const CONFIDENCE_LEVELS = [0.68, 0.8, 0.9, 0.95] as const;

/** The Guideline 14 test of meaningful savings: uncertainty under 50% of savings at 68% confidence. */
export const SIGNIFICANCE_RULE = { confidence: 0.68, maxFractionalUncertainty: 0.5 } as const;

export interface SavingsOptions {
  /** Two-sided confidence of the stated uncertainty. Default 0.68. */
  confidence?: number;
  /** Widen for autocorrelated residuals by n/n′ (default true). */
  autocorrelationCorrection?: boolean;
  /** Non-routine adjustments; each adds its days' share to the adjusted baseline of the periods it covers. */
  adjustments?: readonly NonRoutineAdjustment[];
}

export interface SavingsPeriod {
  start: string;
  end: string;
  days: number;
  meanTemp: number;
  actual: number;
  /** The frozen model's projection: days × f(period), in the fit's temperature form. */
  modelBaseline: number;
  /** Non-routine adjustments falling in the period (+ adds to the adjusted baseline). */
  adjustment: number;
  /** modelBaseline + adjustment. */
  adjustedBaseline: number;
  savings: number;
  /** The period's temperature lies outside the baseline's range: the model is extrapolating. */
  outsideBaselineRange: boolean;
  /** Variables whose value this period lies outside the range the baseline saw (only for models with variables). */
  outsideVariableRanges?: string[];
}

export interface Uncertainty {
  /** ΔS/S as a positive fraction (Infinity when S = 0). */
  fractional: number;
  /** ΔS in the meter's unit. */
  absolute: number;
}

export interface SavingsTotals {
  actual: number;
  modelBaseline: number;
  adjustments: number;
  adjustedBaseline: number;
  savings: number;
  fractionSaved: number;
  confidence: number;
  uncertainty: {
    guideline14: Uncertainty;
    exact: Uncertainty;
    /**
     * The non-routine adjustments' own ± at `confidence`: their stated
     * standard uncertainties (the share of each inside the reporting
     * periods, combined in quadrature) × the two-sided normal quantile.
     * 0 when no adjustment states one.
     */
    adjustments: { absolute: number };
    /**
     * The larger of the model's two ± combined in quadrature with the
     * adjustments' ±; fractional = absolute / |savings|.
     */
    combined: Uncertainty;
  };
  /** Savings distinguishable from zero under the 50%-at-68% rule, by the more cautious of the two formulas. */
  significant: boolean;
  /** Share of the model baseline from periods outside the baseline's temperature range. */
  outsideRangeShare: number;
  /** Per variable: share of the model baseline from periods whose value lies outside the baseline's range (models with variables only). */
  outsideVariableRangeShares?: Record<string, number>;
}

export interface SavingsResult {
  model: ModelName;
  /** The frozen model's temperature form, which the projection follows. */
  temperatureForm: TemperatureForm;
  periods: SavingsPeriod[];
  totals: SavingsTotals;
  significance: {
    rule: string;
    fractionalAt68: { guideline14: number; exact: number };
  };
  baselineTemperatureRange: { min: number; max: number };
  /** Inputs of the uncertainty formulas, for audit. */
  uncertaintyInputs: {
    n: number;
    nPrime: number;
    m: number;
    p: number;
    t: number;
    autocorrelation: number;
    cvrmse: number;
  };
}

/**
 * Savings of `reporting` periods against a fitted baseline model.
 * Throws TooFewPeriodsError when there is no reporting period.
 */
export function computeSavings(
  baseline: ShapeFit,
  reporting: readonly Period[],
  options: SavingsOptions = {},
): SavingsResult {
  const confidence = options.confidence ?? SIGNIFICANCE_RULE.confidence;
  if (!(confidence > 0 && confidence < 1)) throw new RangeError(`confidence must lie in (0, 1), got ${confidence}`);
  if (reporting.length < MIN_REPORTING_PERIODS)
    throw new TooFewPeriodsError('savings', MIN_REPORTING_PERIODS, reporting.length, []);
  const ordered = [...reporting].sort((a, b) => (a.start < b.start ? -1 : a.start > b.start ? 1 : 0));
  const range = baseline.temperatureRange;
  const form = fitTemperatureForm(baseline);

  const adjustments = options.adjustments ?? [];
  const variables = fitVariables(baseline);
  checkVariableValues(ordered, variables, 'savings');
  const ranges = baseline.variableRanges ?? {};
  const periods: SavingsPeriod[] = ordered.map((period) => {
    const modelBaseline = period.days * predictWithVariables(baseline, period, form);
    const outsideVariables = variables.filter((name) => {
      const value = period.variables![name]!;
      const range = ranges[name];
      return range !== undefined && (value < range.min || value > range.max);
    });
    const adjustment = adjustments.length > 0 ? adjustmentsForPeriod(adjustments, period.start, period.end) : 0;
    const adjustedBaseline = modelBaseline + adjustment;
    return {
      start: period.start,
      end: period.end,
      days: period.days,
      meanTemp: period.meanTemp,
      actual: period.quantity,
      modelBaseline,
      adjustment,
      adjustedBaseline,
      savings: adjustedBaseline - period.quantity,
      outsideBaselineRange: period.meanTemp < range.min || period.meanTemp > range.max,
      ...(variables.length > 0 ? { outsideVariableRanges: outsideVariables } : {}),
    };
  });

  const actual = sum(periods.map((p) => p.actual));
  const modelBaseline = sum(periods.map((p) => p.modelBaseline));
  const adjustmentTotal = sum(periods.map((p) => p.adjustment));
  const adjustedBaseline = modelBaseline + adjustmentTotal;
  const savings = adjustedBaseline - actual;
  const fractionSaved = savings / adjustedBaseline;
  // The Annex B formula is stated for the model's own savings; its absolute ΔS carries over unchanged.
  const modelFraction = (modelBaseline - actual) / modelBaseline;
  const outside = sum(periods.filter((p) => p.outsideBaselineRange).map((p) => p.modelBaseline));

  const n = baseline.n;
  const rho = baseline.stats.autocorrelation;
  const correct = options.autocorrelationCorrection ?? true;
  const nPrime = correct ? effectiveSampleSize(n, rho) : n;
  const rows = ordered.map((period) => ({
    days: period.days,
    designRow: designRowWithVariables(baseline.model, baseline.changepoints, period, form, variables),
  }));
  const variance = exactSavingsVariance(baseline.unscaledCovariance, baseline.residualVariance, rows, n / nPrime);

  const uncertaintyAt = (level: number) => {
    const t = twoSidedTCritical(level, n - baseline.p);
    const modelFractional = guideline14FractionalUncertainty({
      t,
      cvrmse: baseline.stats.cvrmse,
      n,
      nPrime,
      m: periods.length,
      fractionSaved: modelFraction,
    });
    // ΔS = t·1.26·CV·sqrt(…)·Σ model baseline: the fractional form at F = 1, scaled (no 0/0 when S = 0).
    const g14Absolute =
      guideline14FractionalUncertainty({
        t,
        cvrmse: baseline.stats.cvrmse,
        n,
        nPrime,
        m: periods.length,
        fractionSaved: 1,
      }) * Math.abs(modelBaseline);
    const exactAbsolute = t * Math.sqrt(variance);
    return {
      t,
      guideline14: {
        fractional: adjustmentTotal === 0 ? modelFractional : g14Absolute / Math.abs(savings),
        absolute: g14Absolute,
      },
      exact: { fractional: exactAbsolute / Math.abs(savings), absolute: exactAbsolute },
    };
  };
  const chosen = uncertaintyAt(confidence);
  const adjustmentsAbsolute =
    adjustments.length > 0
      ? twoSidedNormalQuantile(confidence) * adjustmentsUncertaintyInPeriods(adjustments, ordered)
      : 0;
  const modelValues = [chosen.guideline14.absolute, chosen.exact.absolute].filter(Number.isFinite);
  const modelAbsolute = modelValues.length > 0 ? Math.max(...modelValues) : Number.NaN;
  const combinedAbsolute = combineInQuadrature([modelAbsolute, adjustmentsAbsolute]);
  const at68 = uncertaintyAt(SIGNIFICANCE_RULE.confidence);
  const worstAt68 = Math.max(at68.guideline14.fractional, at68.exact.fractional);

  return {
    model: baseline.model,
    temperatureForm: form,
    periods,
    totals: {
      actual,
      modelBaseline,
      adjustments: adjustmentTotal,
      adjustedBaseline,
      savings,
      fractionSaved,
      confidence,
      uncertainty: {
        guideline14: chosen.guideline14,
        exact: chosen.exact,
        adjustments: { absolute: adjustmentsAbsolute },
        combined: { fractional: combinedAbsolute / Math.abs(savings), absolute: combinedAbsolute },
      },
      significant: worstAt68 < SIGNIFICANCE_RULE.maxFractionalUncertainty,
      outsideRangeShare: modelBaseline !== 0 ? outside / modelBaseline : 0,
      ...(variables.length > 0
        ? {
            outsideVariableRangeShares: Object.fromEntries(
              variables.map((name) => [
                name,
                modelBaseline !== 0
                  ? sum(periods.filter((p) => p.outsideVariableRanges!.includes(name)).map((p) => p.modelBaseline)) /
                    modelBaseline
                  : 0,
              ]),
            ),
          }
        : {}),
    },
    significance: {
      rule: 'ASHRAE Guideline 14: savings are meaningful when their uncertainty is below 50% of the savings at 68% confidence; judged here by the larger of the two formulas',
      fractionalAt68: { guideline14: at68.guideline14.fractional, exact: at68.exact.fractional },
    },
    baselineTemperatureRange: { ...range },
    uncertaintyInputs: {
      n,
      nPrime,
      m: periods.length,
      p: baseline.p,
      t: chosen.t,
      autocorrelation: rho,
      cvrmse: baseline.stats.cvrmse,
    },
  };
}

function sum(values: readonly number[]): number {
  return values.reduce((total, value) => total + value, 0);
}
