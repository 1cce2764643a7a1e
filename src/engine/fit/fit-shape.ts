/**
 * Fit one shape to a baseline: exact changepoints, then a weighted least-
 * squares fit with the changepoints held fixed for coefficients, standard
 * errors and t-statistics, then the changepoints' own standard errors from the
 * Gauss–Newton covariance of the full nonlinear model.
 */
import { PARAMETER_COUNT, type ModelName, type Period, type TemperatureForm } from '../types.js';
import { invertMatrix } from './matrix.js';
import { weightedLeastSquares } from './wls.js';
import { buildSortedSums } from './sorted-sums.js';
import { searchChangepoints, type ChangepointOptimum } from './changepoint-search.js';
import { searchDayResolved } from './day-resolved/search.js';
import { billDaysOf, withExtraColumns, type BillDays } from './day-resolved/bill-days.js';
import { checkVariableValues, designRowWithVariables, fitVariables, variableValues } from './variable-columns.js';

import {
  changepointDerivatives,
  changepointNames,
  coefficientNames,
  slopeSign,
  type Changepoints,
} from './shape-model.js';
import { energyResiduals, goodnessOfFit } from '../stats/goodness-of-fit.js';
import { durbinWatson, lagOneAutocorrelation } from '../stats/autocorrelation.js';
import { ar1VarianceInflation } from '../stats/autocorrelation-inflation.js';
import { outOfSampleBlocks, outOfSampleFit, type OutOfSampleStatistics } from '../stats/out-of-sample.js';

export interface Coefficient {
  name: string;
  /** As dy/dx for slopes (see shape-model.ts). */
  estimate: number;
  standardError: number;
  tStat: number;
  /**
   * The t-statistic with the residuals' lag-1 autocorrelation allowed for:
   * tStat / √κ, κ the coefficient's variance inflation under AR(1) errors
   * (stats/autocorrelation-inflation.ts). Equal to tStat when the residuals
   * are not positively autocorrelated.
   */
  tStatAdjusted: number;
}

export interface ChangepointEstimate {
  name: string;
  estimate: number;
  /** Gauss–Newton standard error; null where the covariance is singular (e.g. a zero slope). */
  standardError: number | null;
}

export interface FitStatistics {
  r2: number;
  adjustedR2: number;
  rmse: number;
  cvrmse: number;
  nmbe: number;
  /** Lag-1 autocorrelation of the energy residuals in time order. */
  autocorrelation: number;
  durbinWatson: number;
  /**
   * CV(RMSE) and NMBE of out-of-sample predictions (stats/out-of-sample.ts):
   * every period predicted without itself (bills) or without its calendar
   * month (daily data). Fits stored before it existed lack it.
   */
  outOfSample?: OutOfSampleStatistics;
}

export interface ShapeFit {
  ok: true;
  model: ModelName;
  /**
   * How the fit saw each reading's weather ('daily': day-resolved, 'mean':
   * at its mean temperature). Fits stored before the day-resolved form
   * existed lack it and are mean-form fits (see fitTemperatureForm).
   */
  temperatureForm: TemperatureForm;
  n: number;
  p: number;
  changepoints: Changepoints;
  /** Coefficients in design-column order, as the regression sees them. */
  rawCoefficients: number[];
  /** (XᵀWX)⁻¹ with the changepoints fixed. */
  unscaledCovariance: number[][];
  /**
   * Each coefficient's variance inflation κ under AR(1) errors with the
   * residuals' lag-1 autocorrelation (1 when it is not positive), in design
   * order. Fits stored before it existed lack it.
   */
  varianceInflation?: number[];
  /** The lag-1 autocorrelation κ and tStatAdjusted were computed with (the fit's own, or the noise's as the shape choice estimates it). */
  inflationAutocorrelation?: number;
  /** σ² = sse / (n − p). */
  residualVariance: number;
  coefficients: Coefficient[];
  changepointEstimates: ChangepointEstimate[];
  /** Every parameter by name, slopes as dy/dx: the compact view. */
  parameters: Record<string, number>;
  /** Points in each segment; a point on a changepoint counts in both. */
  segmentCounts: Record<string, number>;
  /** Lowest and highest mean temperature of the baseline periods. */
  temperatureRange: { min: number; max: number };
  /** Day-resolved fits: lowest and highest daily temperature the model saw (null in the mean form). */
  dayTemperatureRange?: { min: number; max: number } | null;
  /**
   * Independent variables the model carries, in design order after the
   * shape's columns (use per day = shape(T) + Σβk·zk). Absent for a
   * weather-only fit (and in every fit stored before variables existed).
   */
  variables?: string[];
  /** Lowest and highest per-day value of each variable over the baseline (the extrapolation guard reads it). */
  variableRanges?: Record<string, { min: number; max: number }>;
  /** Σ days·(usePerDay − fitted)². */
  sse: number;
  stats: FitStatistics;
  /** Energy residuals eᵢ = quantityᵢ − daysᵢ·ŷᵢ, in time order. */
  residuals: number[];
}

export interface ShapeFitFailure {
  ok: false;
  model: ModelName;
  n: number;
  p: number;
  reason: string;
}

export type ShapeFitResult = ShapeFit | ShapeFitFailure;

/** The form of a fit; fits stored before the day-resolved form existed are mean-form fits. */
export function fitTemperatureForm(
  fit: Pick<ShapeFit, 'temperatureForm'> | { temperatureForm?: TemperatureForm },
): TemperatureForm {
  return fit.temperatureForm ?? 'mean';
}

/** Do all periods carry their days' temperatures (so the day-resolved form can be fitted)? */
export function periodsHaveDays(periods: readonly Period[]): boolean {
  return periods.every((period) => period.dayTemps !== undefined && period.dayTemps.length > 0);
}

/**
 * Fit `model` to `periods` (any order; statistics use start-date order).
 * `minPointsPerSegment` bounds where changepoints may go. In the 'daily'
 * form every period must carry its days' temperatures (alignPeriods does);
 * for one-day periods both forms give the same fit.
 */
export function fitShape(
  periods: readonly Period[],
  model: ModelName,
  minPointsPerSegment: number,
  form: TemperatureForm = 'mean',
  variables: readonly string[] = [],
): ShapeFitResult {
  const ordered = [...periods].sort((a, b) => (a.start < b.start ? -1 : a.start > b.start ? 1 : 0));
  const n = ordered.length;
  // p counts every parameter: the shape's coefficients and changepoints and one per variable.
  const p = PARAMETER_COUNT[model] + variables.length;
  const fail = (reason: string): ShapeFitFailure => ({ ok: false, model, n, p, reason });
  if (form === 'daily' && !periodsHaveDays(ordered)) {
    throw new RangeError(
      'the day-resolved form needs the daily temperatures of every period (align the readings with alignPeriods)',
    );
  }
  if (n <= p) return fail(`needs more than ${p} periods, has ${n}`);
  if (new Set(variables).size !== variables.length) throw new RangeError('a variable is named twice');
  checkVariableValues(ordered, variables, 'baseline');

  const x = ordered.map((period) => period.meanTemp);
  const y = ordered.map((period) => period.usePerDay);
  const w = ordered.map((period) => period.days);

  let changepoints: Changepoints = { heating: null, cooling: null };
  if (model === '3PC' || model === '3PH' || model === '4P' || model === '5P') {
    const optimum = searchShape(periods, model, minPointsPerSegment, form, x, y, w, variables);
    if (!optimum) return fail(`no changepoint leaves ${minPointsPerSegment} points in every segment`);
    changepoints = { heating: optimum.heatingChangepoint, cooling: optimum.coolingChangepoint };
  }

  const design = ordered.map((period) => designRowWithVariables(model, changepoints, period, form, variables));
  const regression = weightedLeastSquares(design, y, w, n - p);
  if (!regression)
    return fail(
      variables.length > 0
        ? 'the regression is singular (too little spread in temperature, or a variable constant or a combination of the others)'
        : 'the regression is singular (too little spread in temperature)',
    );

  const residuals = energyResiduals({
    quantity: ordered.map((q) => q.quantity),
    days: w,
    fittedPerDay: regression.fitted,
    p,
  });
  const autocorrelation = lagOneAutocorrelation(residuals);
  const inflation = ar1VarianceInflation(design, w, autocorrelation);
  const shapeColumns = coefficientNames(model).length;
  const names = [...coefficientNames(model), ...variables];
  const coefficients: Coefficient[] = regression.coefficients.map((raw, j) => {
    const sign = j < shapeColumns ? slopeSign(model, j) : 1; // variables' coefficients are reported as they are
    return {
      name: names[j]!,
      estimate: sign * raw,
      standardError: regression.standardErrors[j]!,
      tStat: sign * regression.tStats[j]!,
      tStatAdjusted: (sign * regression.tStats[j]!) / Math.sqrt(inflation[j]!),
    };
  });
  const derivatives = ordered.map((period) =>
    changepointDerivatives(model, changepoints, regression.coefficients, period, form),
  );
  const changepointEstimates = estimateChangepointErrors(
    model,
    changepoints,
    w,
    design,
    derivatives,
    regression.residualVariance,
  );

  const parameters: Record<string, number> = {};
  for (const c of coefficients) parameters[c.name] = c.estimate;
  for (const c of changepointEstimates) parameters[c.name] = c.estimate;

  const fit = goodnessOfFit({ quantity: ordered.map((q) => q.quantity), days: w, fittedPerDay: regression.fitted, p });
  const blocks = outOfSampleBlocks(ordered);
  return {
    ok: true,
    model,
    temperatureForm: form,
    n,
    p,
    changepoints,
    rawCoefficients: regression.coefficients,
    unscaledCovariance: regression.unscaledCovariance,
    varianceInflation: inflation,
    inflationAutocorrelation: Math.max(0, Number.isFinite(autocorrelation) ? autocorrelation : 0),
    residualVariance: regression.residualVariance,
    coefficients,
    changepointEstimates,
    parameters,
    segmentCounts: segmentCounts(model, changepoints, ordered, form),
    temperatureRange: { min: Math.min(...x), max: Math.max(...x) },
    dayTemperatureRange: form === 'daily' ? dayRange(ordered) : null,
    ...(variables.length > 0 ? { variables: [...variables], variableRanges: variableRanges(ordered, variables) } : {}),
    sse: regression.sse,
    stats: {
      ...fit,
      autocorrelation,
      durbinWatson: durbinWatson(residuals),
      outOfSample: outOfSampleFit(
        { design, usePerDay: y, days: w, quantity: ordered.map((q) => q.quantity), blocks: blocks.blocks },
        blocks.method,
        regression.unscaledCovariance,
        regression.coefficients,
      ),
    },
    residuals,
  };
}

/**
 * Exact changepoints: the running-sum (Hudson) search on period means for the
 * mean form and for one-day periods (where both forms coincide), the
 * day-resolved search for longer periods in the daily form.
 */
function searchShape(
  periods: readonly Period[],
  model: '3PC' | '3PH' | '4P' | '5P',
  minPoints: number,
  form: TemperatureForm,
  x: readonly number[],
  y: readonly number[],
  w: readonly number[],
  variables: readonly string[],
): ChangepointOptimum | null {
  if (variables.length > 0) return searchDayResolved(searchView(periods, form, variables), model, minPoints);
  const oneDayEach = periods.every((period) => period.dayTemps?.length === 1);
  if (form === 'mean' || oneDayEach) return searchChangepoints(buildSortedSums(x, y, w), model, minPoints);
  return searchDayResolved(billDaysOf(periods), model, minPoints);
}

/**
 * The search's view of periods with variables: their days (day-resolved
 * form) or one pseudo-day at the mean temperature each (mean form, where
 * the day-resolved terms are the ordinary hinges and the segment rule is the
 * mean form's), with the variables as extra fixed columns. For fixed
 * changepoints the model is linear in every coefficient, so the same exact
 * search carries the extra columns (basis-sweep.ts, five-point-basis.ts).
 */
export function searchView(periods: readonly Period[], form: TemperatureForm, variables: readonly string[]): BillDays {
  const base =
    form === 'daily'
      ? billDaysOf(periods)
      : billDaysOf(periods.map((period) => ({ ...period, dayTemps: [period.meanTemp] })));
  if (variables.length === 0) return base;
  const columns = variables.map((_, k) => periods.map((period) => variableValues(period, variables)[k]!));
  return withExtraColumns(base, variables.join('\u0000'), columns);
}

function variableRanges(
  periods: readonly Period[],
  variables: readonly string[],
): Record<string, { min: number; max: number }> {
  const ranges: Record<string, { min: number; max: number }> = {};
  variables.forEach((name, k) => {
    const values = periods.map((period) => variableValues(period, variables)[k]!);
    ranges[name] = { min: Math.min(...values), max: Math.max(...values) };
  });
  return ranges;
}

function dayRange(periods: readonly Period[]): { min: number; max: number } {
  let min = Number.POSITIVE_INFINITY;
  let max = Number.NEGATIVE_INFINITY;
  for (const period of periods) {
    for (const temp of period.dayTemps!) {
      if (temp < min) min = temp;
      if (temp > max) max = temp;
    }
  }
  return { min, max };
}

/**
 * Readings in each segment. In the mean form a reading counts in the segment
 * that holds its mean temperature; in the day-resolved form by the share of
 * its days that fall in it (for one-day readings the same). A reading or day
 * on a changepoint counts in both segments it touches.
 */
function segmentCounts(
  model: ModelName,
  cp: Changepoints,
  periods: readonly Period[],
  form: TemperatureForm,
): Record<string, number> {
  const measure = (test: (temp: number) => boolean): number => {
    let total = 0;
    for (const period of periods) {
      if (form === 'mean') {
        if (test(period.meanTemp)) total += 1;
        continue;
      }
      const temps = period.dayTemps!;
      let inside = 0;
      for (const temp of temps) if (test(temp)) inside++;
      total += inside / temps.length;
    }
    // Shares of whole days: round off the sum's last bits so 3 readings' worth reads as 3.
    return Math.round(total * 1e9) / 1e9;
  };
  const cH = cp.heating ?? Number.NaN;
  const cC = cp.cooling ?? Number.NaN;
  switch (model) {
    case '1P':
    case '2P':
      return { all: periods.length };
    case '3PC':
      return { flat: measure((v) => v <= cC), cooling: measure((v) => v >= cC) };
    case '3PH':
      return { heating: measure((v) => v <= cH), flat: measure((v) => v >= cH) };
    case '4P':
      return { below: measure((v) => v <= cH), above: measure((v) => v >= cH) };
    case '5P':
      return {
        heating: measure((v) => v <= cH),
        flat: measure((v) => v >= cH && v <= cC),
        cooling: measure((v) => v >= cC),
      };
  }
}

/**
 * Gauss–Newton covariance σ²(JᵀWJ)⁻¹ of all parameters, changepoints
 * included: J holds the design columns plus ∂ŷ/∂c for each changepoint
 * (shape-model.ts: the slope times the share of the period's days on the
 * hinge's active side; in the mean form that share is 0 or 1).
 */
function estimateChangepointErrors(
  model: ModelName,
  cp: Changepoints,
  w: readonly number[],
  design: readonly number[][],
  derivatives: readonly number[][],
  residualVariance: number,
): ChangepointEstimate[] {
  const names = changepointNames(model);
  if (names.length === 0) return [];
  const cH = cp.heating ?? Number.NaN;
  const cC = cp.cooling ?? Number.NaN;
  const jacobian = design.map((row, i) => [...row, ...derivatives[i]!]);
  const width = jacobian[0]!.length;
  const information = Array.from({ length: width }, () => new Array<number>(width).fill(0));
  for (let i = 0; i < jacobian.length; i++) {
    const row = jacobian[i]!;
    for (let a = 0; a < width; a++) for (let b = 0; b < width; b++) information[a]![b]! += w[i]! * row[a]! * row[b]!;
  }
  const inverse = invertMatrix(information);
  const estimates = model === '5P' ? [cH, cC] : model === '3PC' ? [cC] : [cH];
  return names.map((name, j) => {
    const index = width - names.length + j;
    const variance = inverse ? residualVariance * inverse[index]![index]! : Number.NaN;
    return { name, estimate: estimates[j]!, standardError: variance > 0 ? Math.sqrt(variance) : null };
  });
}

/**
 * The fit with its variance inflation and adjusted t-statistics recomputed
 * for a given residual autocorrelation: the shape choice uses the noise's
 * own persistence (from the best-fitting shape) for every candidate, so
 * that a shape's misfit, which also shows up as autocorrelated residuals, is
 * not read as noise.
 */
export function withAutocorrelation(fit: ShapeFit, periods: readonly Period[], rho: number): ShapeFit {
  const ordered = [...periods].sort((a, b) => (a.start < b.start ? -1 : a.start > b.start ? 1 : 0));
  const form = fitTemperatureForm(fit);
  const design = ordered.map((period) =>
    designRowWithVariables(fit.model, fit.changepoints, period, form, fitVariables(fit)),
  );
  const inflation = ar1VarianceInflation(
    design,
    ordered.map((period) => period.days),
    rho,
  );
  return {
    ...fit,
    varianceInflation: inflation,
    inflationAutocorrelation: Math.max(0, Number.isFinite(rho) ? rho : 0),
    coefficients: fit.coefficients.map((c, j) => ({ ...c, tStatAdjusted: c.tStat / Math.sqrt(inflation[j]!) })),
  };
}
