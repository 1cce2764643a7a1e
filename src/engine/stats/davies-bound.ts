/**
 * A p-value for a test whose changepoint is searched.
 *
 * When a changepoint is fitted by searching, the F-statistic of the best
 * placement is the largest of many correlated F-statistics, one per
 * placement, and the ordinary F distribution understates how often it is
 * large under the simpler model (the changepoint does not even exist
 * there). Davies (1987, "Hypothesis testing when a nuisance parameter is
 * present only under the alternative", Biometrika 74:33–43) bounds the tail
 * of the supremum of a χ² process S(τ) with s degrees of freedom by
 *   P(sup S > u) ≤ P(χ²ₛ > u) + V·u^((s−1)/2)·e^(−u/2)·2^(−s/2)/Γ(s/2),
 * where V is the total variation of √S along the path of τ, estimated from
 * the observed path (the form here is from memory of the paper, checked by
 * simulation in the tests). For s = 1 the second term is V·e^(−u/2)/√(2π),
 * for s = 2 it is V·√u·e^(−u/2)/2. The path's F-statistics are mapped to
 * that scale through the F tail of the best one, so that small samples are
 * not treated as if σ were known.
 */
import { chiSquareOneForTail, fPValue } from './distributions.js';

export interface SearchedTestInput {
  /** F-statistics along the changepoint's path, in the path's order. */
  path: readonly number[];
  /** Numerator degrees of freedom: the coefficients the richer shape adds (1 or 2). Default 1. */
  df1?: 1 | 2;
  /** The observed statistic: the largest F over the placements that could be chosen. */
  observed: number;
  /** Denominator degrees of freedom of the richer model. */
  df2: number;
  /** Separate stretches the path falls into (each adds its own starting chance). Default 1. */
  pieces?: number;
}

/**
 * Davies' upper bound on the p-value of the largest F over a searched
 * changepoint, or 1 when the statistic is not positive.
 * @example searchedChangepointPValue({ path: [0, 4, 0], observed: 4, df2: 1e6 }) // 0.2614… — P(χ²₁ > 4) + total variation 4·e^(−2)/√(2π): 0.0455 + 0.2159 (source: Davies 1987 bound, by hand)
 */
export function searchedChangepointPValue(input: SearchedTestInput): number {
  const { path, observed, df2 } = input;
  const df1 = input.df1 ?? 1;
  if (!(observed > 0)) return 1;
  const tail = fPValue(observed, df1, df2);
  // The χ² value with the same upper tail: (Φ⁻¹(1 − p/2))² for one degree of freedom, −2·ln p for two.
  const u = df1 === 1 ? chiSquareOneForTail(tail) : tail > 0 ? -2 * Math.log(tail) : Number.POSITIVE_INFINITY;
  if (!Number.isFinite(u)) return tail;
  // √S = √(scale·F) along the path, scaled so that the observed F sits at u.
  const scale = u / observed;
  let variation = 0;
  for (let i = 1; i < path.length; i++) {
    variation += Math.abs(Math.sqrt(Math.max(0, path[i]!)) - Math.sqrt(Math.max(0, path[i - 1]!)));
  }
  variation *= Math.sqrt(scale);
  const pieces = Math.max(1, input.pieces ?? 1);
  const crossing = df1 === 1 ? Math.exp(-u / 2) / Math.sqrt(2 * Math.PI) : (Math.sqrt(u) * Math.exp(-u / 2)) / 2;
  return Math.min(1, pieces * tail + variation * crossing);
}
