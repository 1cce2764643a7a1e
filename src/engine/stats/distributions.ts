import { incompleteBeta, inverseErfc, inverseIncompleteBeta } from './special-functions.js';

// The distribution functions as jstat 1.9.6 defines them, on its special
// functions ported to special-functions.ts (same operations, same results).

/** Student t quantile (jstat's studentt.inv). */
function studentTQuantile(p: number, dof: number): number {
  let x = inverseIncompleteBeta(2 * Math.min(p, 1 - p), 0.5 * dof, 0.5);
  x = Math.sqrt((dof * (1 - x)) / x);
  return p > 0.5 ? x : -x;
}

/** F distribution function (jstat's centralF.cdf). */
function fDistribution(x: number, df1: number, df2: number): number {
  if (x < 0) return 0;
  return incompleteBeta((df1 * x) / (df1 * x + df2), df1 / 2, df2 / 2);
}

/** F quantile (jstat's centralF.inv). */
function fQuantile(p: number, df1: number, df2: number): number {
  return df2 / (df1 * (1 / inverseIncompleteBeta(p, df1 / 2, df2 / 2) - 1));
}

/** Normal quantile (jstat's normal.inv). */
function normalQuantile(p: number, mean: number, sd: number): number {
  return -1.41421356237309505 * sd * inverseErfc(2 * p) + mean;
}

/**
 * Two-sided Student t critical value: P(|T| ≤ t) = confidence with `dof` degrees of freedom.
 * @example twoSidedTCritical(0.95, 10) // 2.2281… — t₀.₉₇₅ with 10 degrees of freedom, 2.228 in printed t tables (source: common practice)
 */
export function twoSidedTCritical(confidence: number, dof: number): number {
  if (!(confidence > 0 && confidence < 1)) throw new RangeError(`confidence must lie in (0, 1), got ${confidence}`);
  if (!(dof > 0)) return Number.POSITIVE_INFINITY;
  return studentTQuantile((1 + confidence) / 2, dof);
}

/**
 * Upper critical value of the F distribution: P(F ≤ f) = 1 − level.
 * @example fCritical(0.05, 1, 10) // 4.9646… — F₀.₉₅(1, 10), 4.96 in printed F tables (source: common practice)
 */
export function fCritical(level: number, df1: number, df2: number): number {
  return fQuantile(1 - level, df1, df2);
}

/**
 * Upper-tail probability of an F statistic.
 * @example fPValue(4.964603, 1, 10) // ≈ 0.05000 — the upper tail at the 5% critical value above (source: common practice)
 */
export function fPValue(f: number, df1: number, df2: number): number {
  if (!Number.isFinite(f)) return f > 0 ? 0 : Number.NaN;
  return 1 - fDistribution(f, df1, df2);
}

/**
 * The standard normal distribution's two-sided quantile z, P(|Z| ≤ z) =
 * confidence: for figures given as a standard uncertainty (one standard
 * deviation) rather than estimated from a regression, the half-width at
 * confidence c is z·σ.
 * @example twoSidedNormalQuantile(0.95) // 1.959963… — z₀.₉₇₅ of the standard normal (source: common practice)
 */
export function twoSidedNormalQuantile(confidence: number): number {
  if (!(confidence > 0 && confidence < 1)) throw new RangeError(`confidence must lie in (0, 1), got ${confidence}`);
  return normalQuantile((1 + confidence) / 2, 0, 1);
}

/**
 * The χ² statistic with one degree of freedom whose upper tail is `p`:
 * (Φ⁻¹(1 − p/2))². Infinity for p at or below the smallest tail double
 * arithmetic resolves here (1e-15).
 * @example chiSquareOneForTail(0.05) // 3.8414… — 1.959964², χ²₀.₉₅ with 1 degree of freedom, 3.841 in printed tables (source: common practice)
 */
export function chiSquareOneForTail(p: number): number {
  if (!(p > 1e-15)) return Number.POSITIVE_INFINITY;
  if (p >= 1) return 0;
  const z = normalQuantile(1 - p / 2, 0, 1);
  return z * z;
}
