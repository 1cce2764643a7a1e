/**
 * Fit one shape to a baseline: exact changepoints, then a weighted least-
 * squares fit with the changepoints held fixed for coefficients, standard
 * errors and t-statistics, then the changepoints' own standard errors from the
 * Gauss–Newton covariance of the full nonlinear model.
 */
import { PARAMETER_COUNT, type ModelName, type Period } from '../types.js';
import { invertMatrix } from './matrix.js';
import { weightedLeastSquares } from './wls.js';
import { buildSortedSums } from './sorted-sums.js';
import { searchChangepoints } from './changepoint-search.js';
import {
  changepointNames,
  coefficientNames,
  designRow,
  slopeSign,
  type Changepoints,
} from './shape-model.js';
import { energyResiduals, goodnessOfFit } from '../stats/goodness-of-fit.js';
import { durbinWatson, lagOneAutocorrelation } from '../stats/autocorrelation.js';

export interface Coefficient {
  name: string;
  /** As dy/dx for slopes (see shape-model.ts). */
  estimate: number;
  standardError: number;
  tStat: number;
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
}

export interface ShapeFit {
  ok: true;
  model: ModelName;
  n: number;
  p: number;
  changepoints: Changepoints;
  /** Coefficients in design-column order, as the regression sees them. */
  rawCoefficients: number[];
  /** (XᵀWX)⁻¹ with the changepoints fixed. */
  unscaledCovariance: number[][];
  /** σ² = sse / (n − p). */
  residualVariance: number;
  coefficients: Coefficient[];
  changepointEstimates: ChangepointEstimate[];
  /** Every parameter by name, slopes as dy/dx: the compact view. */
  parameters: Record<string, number>;
  /** Points in each segment; a point on a changepoint counts in both. */
  segmentCounts: Record<string, number>;
  temperatureRange: { min: number; max: number };
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

/**
 * Fit `model` to `periods` (any order; statistics use start-date order).
 * `minPointsPerSegment` bounds where changepoints may go.
 */
export function fitShape(periods: readonly Period[], model: ModelName, minPointsPerSegment: number): ShapeFitResult {
  const ordered = [...periods].sort((a, b) => (a.start < b.start ? -1 : a.start > b.start ? 1 : 0));
  const n = ordered.length;
  const p = PARAMETER_COUNT[model];
  const fail = (reason: string): ShapeFitFailure => ({ ok: false, model, n, p, reason });
  if (n <= p) return fail(`needs more than ${p} periods, has ${n}`);

  const x = ordered.map((period) => period.meanTemp);
  const y = ordered.map((period) => period.usePerDay);
  const w = ordered.map((period) => period.days);

  let changepoints: Changepoints = { heating: null, cooling: null };
  if (model === '3PC' || model === '3PH' || model === '4P' || model === '5P') {
    const optimum = searchChangepoints(buildSortedSums(x, y, w), model, minPointsPerSegment);
    if (!optimum) return fail(`no changepoint leaves ${minPointsPerSegment} points in every segment`);
    changepoints = { heating: optimum.heatingChangepoint, cooling: optimum.coolingChangepoint };
  }

  const design = x.map((value) => designRow(model, changepoints, value));
  const regression = weightedLeastSquares(design, y, w, n - p);
  if (!regression) return fail('the regression is singular (too little spread in temperature)');

  const names = coefficientNames(model);
  const coefficients: Coefficient[] = regression.coefficients.map((raw, j) => {
    const sign = slopeSign(model, j);
    return {
      name: names[j]!,
      estimate: sign * raw,
      standardError: regression.standardErrors[j]!,
      tStat: sign * regression.tStats[j]!,
    };
  });
  const changepointEstimates = estimateChangepointErrors(model, changepoints, x, w, design, regression.coefficients, regression.residualVariance);

  const parameters: Record<string, number> = {};
  for (const c of coefficients) parameters[c.name] = c.estimate;
  for (const c of changepointEstimates) parameters[c.name] = c.estimate;

  const residuals = energyResiduals({ quantity: ordered.map((q) => q.quantity), days: w, fittedPerDay: regression.fitted, p });
  const fit = goodnessOfFit({ quantity: ordered.map((q) => q.quantity), days: w, fittedPerDay: regression.fitted, p });
  return {
    ok: true,
    model,
    n,
    p,
    changepoints,
    rawCoefficients: regression.coefficients,
    unscaledCovariance: regression.unscaledCovariance,
    residualVariance: regression.residualVariance,
    coefficients,
    changepointEstimates,
    parameters,
    segmentCounts: countSegments(model, changepoints, x),
    temperatureRange: { min: Math.min(...x), max: Math.max(...x) },
    sse: regression.sse,
    stats: { ...fit, autocorrelation: lagOneAutocorrelation(residuals), durbinWatson: durbinWatson(residuals) },
    residuals,
  };
}

function countSegments(model: ModelName, cp: Changepoints, x: readonly number[]): Record<string, number> {
  const count = (test: (value: number) => boolean): number => x.filter(test).length;
  const cH = cp.heating ?? Number.NaN;
  const cC = cp.cooling ?? Number.NaN;
  switch (model) {
    case '1P':
    case '2P':
      return { all: x.length };
    case '3PC':
      return { flat: count((v) => v <= cC), cooling: count((v) => v >= cC) };
    case '3PH':
      return { heating: count((v) => v <= cH), flat: count((v) => v >= cH) };
    case '4P':
      return { below: count((v) => v <= cH), above: count((v) => v >= cH) };
    case '5P':
      return { heating: count((v) => v <= cH), flat: count((v) => v >= cH && v <= cC), cooling: count((v) => v >= cC) };
  }
}

/**
 * Gauss–Newton covariance σ²(JᵀWJ)⁻¹ of all parameters, changepoints
 * included: J holds the design columns plus ∂ŷ/∂c, which for bh·(cH − x)₊ is
 * bh·[x < cH] and for bq·(x − cC)₊ is −bq·[x > cC].
 */
function estimateChangepointErrors(
  model: ModelName,
  cp: Changepoints,
  x: readonly number[],
  w: readonly number[],
  design: readonly number[][],
  raw: readonly number[],
  residualVariance: number,
): ChangepointEstimate[] {
  const names = changepointNames(model);
  if (names.length === 0) return [];
  const cH = cp.heating ?? Number.NaN;
  const cC = cp.cooling ?? Number.NaN;
  const derivativeColumns = (value: number): number[] => {
    switch (model) {
      case '3PC':
        return [value > cC ? -raw[1]! : 0];
      case '3PH':
        return [value < cH ? raw[1]! : 0];
      case '4P':
        return [(value < cH ? raw[1]! : 0) - (value > cC ? raw[2]! : 0)];
      default:
        return [value < cH ? raw[1]! : 0, value > cC ? -raw[2]! : 0];
    }
  };
  const jacobian = x.map((value, i) => [...design[i]!, ...derivativeColumns(value)]);
  const width = jacobian[0]!.length;
  const information = Array.from({ length: width }, () => new Array<number>(width).fill(0));
  for (let i = 0; i < x.length; i++) {
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
