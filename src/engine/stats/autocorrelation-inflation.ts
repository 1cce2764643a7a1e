/**
 * How much autocorrelated errors widen the sampling variance of least-squares
 * coefficients.
 *
 * With errors that follow a lag-1 autoregressive process in time order
 * (corr(εₜ, εₛ) = ρ^|t−s|), the weighted least-squares coefficients keep
 * their estimates but their covariance becomes the sandwich
 *   (XᵀWX)⁻¹ · Xᵀ W^½ Ω W^½ X · (XᵀWX)⁻¹ · σ²,   Ω_ts = ρ^|t−s|,
 * instead of (XᵀWX)⁻¹·σ² (the covariance of OLS under AR(1) disturbances:
 * Greene, Econometric Analysis, the chapter on serial correlation; from
 * memory). The ratio of the two diagonals is each coefficient's variance
 * inflation κ; t-statistics shrink by √κ and a one-coefficient F-statistic by
 * κ. Temperature and its hinges are themselves strongly autocorrelated, so
 * daily meter data with persistent departures (ρ around 0.6) inflate the
 * variance of a slope about threefold: an uncorrected test fires far more
 * often than its nominal level.
 *
 * Negative ρ is taken as 0 (the correction only ever widens), as for n′.
 */
import { invertMatrix } from '../fit/matrix.js';

/**
 * κⱼ = [(XᵀWX)⁻¹ Xᵀ W^½ Ω W^½ X (XᵀWX)⁻¹]ⱼⱼ / [(XᵀWX)⁻¹]ⱼⱼ for each column j,
 * with the rows of `design` in time order. All ones when ρ ≤ 0 or the
 * design is singular.
 * @example ar1VarianceInflation([[1], [1]], [1, 1], 0.5) // [1.5] — the variance of a mean of two AR(1) values is (1 + ρ)/2 of σ², not 1/2 (source: by hand, common practice)
 */
export function ar1VarianceInflation(
  design: readonly (readonly number[])[],
  weights: readonly number[],
  rho: number,
): number[] {
  const n = design.length;
  const k = design[0]?.length ?? 0;
  const ones = new Array<number>(k).fill(1);
  const r = Number.isFinite(rho) ? Math.min(Math.max(rho, 0), 0.99) : 0;
  if (r === 0 || n === 0) return ones;
  const bread: number[][] = Array.from({ length: k }, () => new Array<number>(k).fill(0));
  const meat: number[][] = Array.from({ length: k }, () => new Array<number>(k).fill(0));
  // Σₜ Σₛ ρ^|t−s| uₜuₛᵀ with uₜ = √wₜ·xₜ: the lower triangle (s ≤ t) is Σₜ uₜ fₜᵀ with the
  // running filter fₜ = uₜ + ρ·fₜ₋₁; the upper triangle is its transpose, the diagonal counted once.
  const filtered = new Array<number>(k).fill(0);
  for (let t = 0; t < n; t++) {
    const root = Math.sqrt(weights[t]!);
    const row = design[t]!;
    for (let a = 0; a < k; a++) filtered[a] = root * row[a]! + r * filtered[a]!;
    for (let a = 0; a < k; a++) {
      const ua = root * row[a]!;
      for (let b = 0; b < k; b++) {
        const ub = root * row[b]!;
        bread[a]![b]! += ua * ub;
        meat[a]![b]! += ua * filtered[b]! + filtered[a]! * ub - ua * ub;
      }
    }
  }
  const inverse = invertMatrix(bread);
  if (!inverse) return ones;
  return ones.map((_, j) => {
    // [A⁻¹ M A⁻¹]ⱼⱼ = aⱼᵀ M aⱼ with aⱼ the j-th column of A⁻¹.
    let sandwich = 0;
    for (let a = 0; a < k; a++)
      for (let b = 0; b < k; b++) sandwich += inverse[a]![j]! * meat[a]![b]! * inverse[b]![j]!;
    const plain = inverse[j]![j]!;
    return plain > 0 && sandwich > 0 ? Math.max(1, sandwich / plain) : 1;
  });
}
