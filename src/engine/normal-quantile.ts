/**
 * The standard normal distribution's two-sided quantile, for figures given
 * as a standard uncertainty (one standard deviation) rather than estimated
 * from a regression: at confidence c the half-width is z·σ with
 * P(|Z| ≤ z) = c.
 */
import jstatModule from 'jstat';

interface NormalDistribution {
  inv(p: number, mean: number, sd: number): number;
}

// jstat is CommonJS; under ESM its namespace arrives as the default export.
// Its normal distribution is not in types/jstat.d.ts, so it is typed here.
const jStat = ((jstatModule as unknown as { jStat?: unknown }).jStat ?? jstatModule) as { normal: NormalDistribution };

/**
 * z with P(|Z| ≤ z) = confidence for a standard normal Z.
 * @example twoSidedNormalQuantile(0.95) // 1.959963…
 */
export function twoSidedNormalQuantile(confidence: number): number {
  if (!(confidence > 0 && confidence < 1)) throw new RangeError(`confidence must lie in (0, 1), got ${confidence}`);
  return jStat.normal.inv((1 + confidence) / 2, 0, 1);
}
