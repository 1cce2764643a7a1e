/**
 * Rolling up uncertainties of parts (meters, periods, measures) into one
 * figure for the whole.
 */

/**
 * sqrt(Σ v²): the combined standard uncertainty of a sum of parts, each
 * given as its own standard uncertainty (or as the same multiple of it, such
 * as a half-width at one confidence level). This assumes the parts are
 * independent: correlated parts (two meters fitted on the same weather, say)
 * combine to more than this. Signs do not matter; an empty list gives 0; a
 * NaN anywhere gives NaN.
 * @example combineInQuadrature([3, 4]) // 5 — √(3² + 4²) (source: by hand, common practice)
 */
export function combineInQuadrature(values: readonly number[]): number {
  // Scale by the largest magnitude so squares neither overflow nor underflow
  // (as Math.hypot does, without spreading a long list into arguments).
  let scale = 0;
  for (const value of values) {
    const size = Math.abs(value);
    if (Number.isNaN(size)) return Number.NaN;
    if (size > scale) scale = size;
  }
  if (scale === 0 || scale === Number.POSITIVE_INFINITY) return scale;
  let sum = 0;
  for (const value of values) sum += (value / scale) ** 2;
  return scale * Math.sqrt(sum);
}
