/**
 * Lag-1 autocorrelation of residuals in time order: ρ = Σ eₜeₜ₋₁ / Σ eₜ².
 * (The usual sample estimator; the residuals of a model with an intercept
 * have mean zero, so no centring is applied.) NaN for fewer than 2 values or
 * all-zero residuals.
 * @example lagOneAutocorrelation([1, -1, 1, -1]) // -0.75 — (−1 − 1 − 1)/4 by the definition above (source: by hand, common practice)
 */
export function lagOneAutocorrelation(residuals: readonly number[]): number {
  let numerator = 0;
  let denominator = 0;
  for (let t = 0; t < residuals.length; t++) {
    denominator += residuals[t]! ** 2;
    if (t > 0) numerator += residuals[t]! * residuals[t - 1]!;
  }
  return residuals.length > 1 && denominator > 0 ? numerator / denominator : Number.NaN;
}

/**
 * Durbin–Watson statistic Σ(eₜ − eₜ₋₁)² / Σ eₜ² (≈ 2(1 − ρ)).
 * @example durbinWatson([1, -1, 1, -1]) // 3 — (4 + 4 + 4)/4, beside 2(1 − ρ) = 3.5 for ρ = −0.75 (source: by hand, common practice)
 */
export function durbinWatson(residuals: readonly number[]): number {
  let numerator = 0;
  let denominator = 0;
  for (let t = 0; t < residuals.length; t++) {
    denominator += residuals[t]! ** 2;
    if (t > 0) numerator += (residuals[t]! - residuals[t - 1]!) ** 2;
  }
  return residuals.length > 1 && denominator > 0 ? numerator / denominator : Number.NaN;
}
