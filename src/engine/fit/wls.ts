import { invertMatrix, multiplyMatrixVector, type Matrix } from './matrix.js';

/** Result of a weighted least-squares fit. */
export interface WlsResult {
  coefficients: number[];
  /** (XᵀWX)⁻¹: multiply by `residualVariance` for the coefficients' covariance. */
  unscaledCovariance: Matrix;
  /** Weighted sum of squared residuals, Σ wᵢ(yᵢ − ŷᵢ)². */
  sse: number;
  /** Degrees of freedom used for `residualVariance`. */
  degreesOfFreedom: number;
  /** σ² = sse / degreesOfFreedom. */
  residualVariance: number;
  standardErrors: number[];
  tStats: number[];
  fitted: number[];
}

/**
 * Weighted least squares: minimise Σ wᵢ(yᵢ − xᵢᵀβ)².
 *
 * `degreesOfFreedom` defaults to n − k (k columns); changepoint models pass
 * n − p so that the changepoints count as parameters. Returns null when the
 * design is rank-deficient.
 * @example weightedLeastSquares([[1, 0], [1, 1], [1, 2]], [1, 3, 5], [1, 1, 1])?.coefficients // [1, 2] — the points lie on y = 1 + 2x (source: by hand)
 */
export function weightedLeastSquares(
  design: readonly (readonly number[])[],
  y: readonly number[],
  weights: readonly number[],
  degreesOfFreedom?: number,
): WlsResult | null {
  const n = y.length;
  const k = design[0]?.length ?? 0;
  if (k === 0 || design.length !== n || weights.length !== n) return null;
  const normal: Matrix = Array.from({ length: k }, () => new Array<number>(k).fill(0));
  const rhs = new Array<number>(k).fill(0);
  for (let i = 0; i < n; i++) {
    const row = design[i]!;
    const w = weights[i]!;
    for (let a = 0; a < k; a++) {
      rhs[a]! += w * row[a]! * y[i]!;
      for (let b = 0; b <= a; b++) normal[a]![b]! += w * row[a]! * row[b]!;
    }
  }
  for (let a = 0; a < k; a++) for (let b = a + 1; b < k; b++) normal[a]![b] = normal[b]![a]!;
  const inverse = invertMatrix(normal);
  if (!inverse) return null;
  const coefficients = multiplyMatrixVector(inverse, rhs);
  const fitted = design.map((row) => row.reduce((sum, value, j) => sum + value * coefficients[j]!, 0));
  let sse = 0;
  for (let i = 0; i < n; i++) sse += weights[i]! * (y[i]! - fitted[i]!) ** 2;
  const df = degreesOfFreedom ?? n - k;
  const residualVariance = df > 0 ? sse / df : Number.NaN;
  const standardErrors = inverse.map((row, j) => Math.sqrt(residualVariance * row[j]!));
  const tStats = coefficients.map((value, j) => value / standardErrors[j]!);
  return {
    coefficients,
    unscaledCovariance: inverse,
    sse,
    degreesOfFreedom: df,
    residualVariance,
    standardErrors,
    tStats,
    fitted,
  };
}
