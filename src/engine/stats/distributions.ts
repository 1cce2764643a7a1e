import jstatModule from 'jstat';

// jstat is CommonJS; under ESM its namespace arrives as the default export.
const jStat = (jstatModule as unknown as { jStat?: typeof jstatModule }).jStat ?? jstatModule;

/** Two-sided Student t critical value: P(|T| ≤ t) = confidence with `dof` degrees of freedom. */
export function twoSidedTCritical(confidence: number, dof: number): number {
  if (!(confidence > 0 && confidence < 1)) throw new RangeError(`confidence must lie in (0, 1), got ${confidence}`);
  if (!(dof > 0)) return Number.POSITIVE_INFINITY;
  return jStat.studentt.inv((1 + confidence) / 2, dof);
}

/** Upper critical value of the F distribution: P(F ≤ f) = 1 − level. */
export function fCritical(level: number, df1: number, df2: number): number {
  return jStat.centralF.inv(1 - level, df1, df2);
}

/** Upper-tail probability of an F statistic. */
export function fPValue(f: number, df1: number, df2: number): number {
  if (!Number.isFinite(f)) return f > 0 ? 0 : Number.NaN;
  return 1 - jStat.centralF.cdf(f, df1, df2);
}

/**
 * The standard normal distribution's two-sided quantile z, P(|Z| ≤ z) =
 * confidence: for figures given as a standard uncertainty (one standard
 * deviation) rather than estimated from a regression, the half-width at
 * confidence c is z·σ.
 * @example twoSidedNormalQuantile(0.95) // 1.959963…
 */
export function twoSidedNormalQuantile(confidence: number): number {
  if (!(confidence > 0 && confidence < 1)) throw new RangeError(`confidence must lie in (0, 1), got ${confidence}`);
  return jStat.normal.inv((1 + confidence) / 2, 0, 1);
}

/**
 * The χ² statistic with one degree of freedom whose upper tail is `p`:
 * (Φ⁻¹(1 − p/2))². Infinity for p at or below the smallest tail double
 * arithmetic resolves here (1e-15).
 */
export function chiSquareOneForTail(p: number): number {
  if (!(p > 1e-15)) return Number.POSITIVE_INFINITY;
  if (p >= 1) return 0;
  const z = jStat.normal.inv(1 - p / 2, 0, 1);
  return z * z;
}
