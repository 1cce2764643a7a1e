import { quadraticForm, type Matrix } from '../fit/matrix.js';

/**
 * Effective sample size n′ = n(1 − ρ)/(1 + ρ) for lag-1 autocorrelated
 * residuals (ASHRAE Guideline 14 Annex B). Negative ρ is treated as 0, so the
 * correction only ever widens the uncertainty (common practice).
 * @example effectiveSampleSize(36, 0.5) // 12 — 36·(1 − 0.5)/(1 + 0.5) (source: ASHRAE Guideline 14 Annex B formula, from memory)
 */
export function effectiveSampleSize(n: number, autocorrelation: number): number {
  const rho = Math.max(0, Number.isFinite(autocorrelation) ? autocorrelation : 0);
  return (n * (1 - rho)) / (1 + rho);
}

export interface Guideline14UncertaintyInput {
  /** Two-sided t at the chosen confidence, n − p degrees of freedom. */
  t: number;
  /** CV(RMSE) of the baseline model, as a fraction. */
  cvrmse: number;
  /** Baseline periods n. */
  n: number;
  /** Effective baseline sample size n′. */
  nPrime: number;
  /** Reporting periods m. */
  m: number;
  /** Fraction saved F = S / Σ adjusted baseline. */
  fractionSaved: number;
}

/**
 * Fractional savings uncertainty ΔS/S by ASHRAE Guideline 14 Annex B
 * (Reddy and Claridge, 2000):
 *   ΔS/S = t · 1.26 · CV · sqrt((n/n′)·(1 + 2/n)·(1/m)) / F.
 * The 1.26 factor is the Guideline's approximation for monthly data.
 * Returned as a positive fraction (|F| is used, so a negative saving gets a
 * positive uncertainty).
 * @example guideline14FractionalUncertainty({ t: 2, cvrmse: 0.1, n: 12, nPrime: 12, m: 12, fractionSaved: 0.1 }) // 0.78574… — 2·1.26·0.1·√((1 + 2/12)/12)/0.1 (source: ASHRAE Guideline 14 Annex B formula, from memory; by hand)
 */
export function guideline14FractionalUncertainty(input: Guideline14UncertaintyInput): number {
  const { t, cvrmse, n, nPrime, m, fractionSaved } = input;
  return (t * 1.26 * cvrmse * Math.sqrt((n / nPrime) * (1 + 2 / n) * (1 / m))) / Math.abs(fractionSaved);
}

export interface ReportingRow {
  days: number;
  /** The model's design row at this period's temperature (changepoints held fixed). */
  designRow: readonly number[];
}

/**
 * Exact variance of total avoided energy for a linear model with fixed
 * changepoints:
 *   Var(S) = (n/n′)·σ²·(cᵀ(XᵀWX)⁻¹c + Σ days_j),  c = Σ days_j·x_j,
 * where σ² is the weighted residual variance of the per-day fit (so a period
 * of d days carries d·σ² of noise in its total).
 * @example exactSavingsVariance([[1]], 2, [{ days: 1, designRow: [1] }]) // 4 — σ²·(cᵀ(XᵀWX)⁻¹c + days) = 2·(1 + 1) (source: by hand)
 */
export function exactSavingsVariance(
  unscaledCovariance: Matrix,
  residualVariance: number,
  rows: readonly ReportingRow[],
  nOverNPrime = 1,
): number {
  const width = unscaledCovariance.length;
  const c = new Array<number>(width).fill(0);
  let totalDays = 0;
  for (const row of rows) {
    totalDays += row.days;
    for (let j = 0; j < width; j++) c[j]! += row.days * row.designRow[j]!;
  }
  return nOverNPrime * residualVariance * (quadraticForm(unscaledCovariance, c) + totalDays);
}
