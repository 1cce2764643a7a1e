/**
 * Least squares on a Gram matrix: the exact day-resolved search keeps the
 * weighted inner products of a handful of columns and of y up to date as a
 * changepoint moves, and answers every question (the SSE of a fixed set of
 * columns, the best position of a hinge inside an interval) from those few
 * numbers, never from the data again.
 *
 * A Gram matrix here is a row-major Float64Array of size m×m whose last row
 * and column belong to y: G[a·m + b] = Σ wᵢ·colₐ(i)·col_b(i).
 */

/** Relative pivot below which a column counts as a combination of the others. */
const PIVOT_TOLERANCE = 1e-9;

/** The search never fits more columns than this; scratch space is kept for it (the engine is single-threaded). */
const MAX_COLUMNS = 24;
const factorScratch = new Float64Array(MAX_COLUMNS * MAX_COLUMNS);
const solutionScratch = new Float64Array(MAX_COLUMNS);

/**
 * Weighted least squares of y on the first m − 1 columns of the Gram matrix
 * (Cholesky): the SSE and the coefficients, or null when the columns are
 * collinear to working precision. `coefficients` receives m − 1 values.
 */
export function gramLeastSquares(gram: Float64Array, m: number, coefficients?: Float64Array): number | null {
  const p = m - 1;
  if (p > MAX_COLUMNS) throw new RangeError(`at most ${MAX_COLUMNS} columns, got ${p}`);
  const l = factorScratch;
  const z = solutionScratch;
  for (let a = 0; a < p; a++) {
    for (let b = 0; b <= a; b++) {
      let sum = gram[a * m + b]!;
      for (let c = 0; c < b; c++) sum -= l[a * p + c]! * l[b * p + c]!;
      if (a === b) {
        if (!(sum > PIVOT_TOLERANCE * gram[a * m + a]!)) return null;
        l[a * p + a] = Math.sqrt(sum);
      } else {
        l[a * p + b] = sum / l[b * p + b]!;
      }
    }
    let rhs = gram[a * m + p]!;
    for (let c = 0; c < a; c++) rhs -= l[a * p + c]! * z[c]!;
    z[a] = rhs / l[a * p + a]!;
  }
  let explained = 0;
  for (let a = 0; a < p; a++) explained += z[a]! * z[a]!;
  if (coefficients) {
    for (let a = p - 1; a >= 0; a--) {
      let value = z[a]!;
      for (let c = a + 1; c < p; c++) value -= l[c * p + a]! * coefficients[c]!;
      coefficients[a] = value / l[a * p + a]!;
    }
  }
  return Math.max(0, gram[p * m + p]! - explained);
}

/** The best placement of a hinge on one interval: its position and the SSE there. */
export interface HingeOptimum {
  tau: number;
  sse: number;
}

/**
 * The best position τ ∈ [low, high] of a hinge column u + τ·v next to fixed
 * columns F (one or two: the intercept, and optionally one more), for a Gram
 * matrix laid out [F₀ … F_{f−1}, u, v, y] (size f + 3).
 *
 * With F partialled out, the SSE is SST − (a + bτ)²/(A + 2Bτ + Cτ²), with
 * a = ⟨ũ,ỹ⟩, b = ⟨ṽ,ỹ⟩, A = ⟨ũ,ũ⟩, B = ⟨ũ,ṽ⟩, C = ⟨ṽ,ṽ⟩. Setting its
 * derivative to zero gives one stationary point besides the root of the
 * numerator, τ* = (aB − bA)/(bB − aC), so the exact minimum over the
 * interval is at τ* (when inside) or at an end.
 *
 * Writes the optimum into `out` and returns true, or returns false when the
 * hinge is a combination of F everywhere on the interval. (An out-parameter
 * because the search calls this once per breakpoint interval.) `onPoint`, if
 * given, sees every point evaluated, in increasing τ: the SSE profile that
 * the searched-changepoint tests read.
 */
export function bestHingeOnInterval(
  gram: Float64Array,
  f: 1 | 2,
  low: number,
  high: number,
  out: HingeOptimum,
  onPoint?: (tau: number, sse: number) => void,
): boolean {
  const m = f + 3;
  const u = f;
  const v = f + 1;
  const y = f + 2;
  // ⟨x̃, z̃⟩ = ⟨x, z⟩ − r_xᵀ G_F⁻¹ r_z, with r_x the inner products of x with F (written out for one and two columns).
  let a: number, b: number, A: number, B: number, C: number, sst: number;
  if (f === 1) {
    const w = gram[0]!;
    if (!(w > 0)) return false;
    const gu = gram[u]!;
    const gv = gram[v]!;
    const gy = gram[y]!;
    a = gram[u * m + y]! - (gu * gy) / w;
    b = gram[v * m + y]! - (gv * gy) / w;
    A = gram[u * m + u]! - (gu * gu) / w;
    B = gram[u * m + v]! - (gu * gv) / w;
    C = gram[v * m + v]! - (gv * gv) / w;
    sst = gram[y * m + y]! - (gy * gy) / w;
  } else {
    // G_F⁻¹ = [[g11, −g01], [−g01, g00]] / det; the cross term of x and z is x₀z₀·g11 − (x₀z₁ + x₁z₀)·g01 + x₁z₁·g00, over det.
    const g00 = gram[0]!;
    const g01 = gram[1]!;
    const g11 = gram[m + 1]!;
    const det = g00 * g11 - g01 * g01;
    if (!(det > PIVOT_TOLERANCE * g00 * g11)) return false;
    const u0 = gram[u]!,
      u1 = gram[m + u]!;
    const v0 = gram[v]!,
      v1 = gram[m + v]!;
    const y0 = gram[y]!,
      y1 = gram[m + y]!;
    a = gram[u * m + y]! - (u0 * y0 * g11 - (u0 * y1 + u1 * y0) * g01 + u1 * y1 * g00) / det;
    b = gram[v * m + y]! - (v0 * y0 * g11 - (v0 * y1 + v1 * y0) * g01 + v1 * y1 * g00) / det;
    A = gram[u * m + u]! - (u0 * u0 * g11 - 2 * u0 * u1 * g01 + u1 * u1 * g00) / det;
    B = gram[u * m + v]! - (u0 * v0 * g11 - (u0 * v1 + u1 * v0) * g01 + u1 * v1 * g00) / det;
    C = gram[v * m + v]! - (v0 * v0 * g11 - 2 * v0 * v1 * g01 + v1 * v1 * g00) / det;
    sst = gram[y * m + y]! - (y0 * y0 * g11 - 2 * y0 * y1 * g01 + y1 * y1 * g00) / det;
  }
  const guu = gram[u * m + u]!;
  const guv = gram[u * m + v]!;
  const gvv = gram[v * m + v]!;

  let bestTau = Number.NaN;
  let bestSse = Number.POSITIVE_INFINITY;
  // The low end, the stationary point when it lies strictly inside, the high end.
  const slopeDenominator = b * B - a * C;
  const stationary = slopeDenominator !== 0 ? (a * B - b * A) / slopeDenominator : Number.NaN;
  const inside = stationary > low && stationary < high;
  for (let c = 0; c < 3; c++) {
    if ((c === 1 && !inside) || (c === 2 && high === low)) continue;
    const tau = c === 0 ? low : c === 1 ? stationary : high;
    const denominator = A + 2 * B * tau + C * tau * tau;
    // Norm of the hinge before F is taken out: a hinge almost inside span F carries no information.
    const raw = guu + 2 * tau * guv + tau * tau * gvv;
    if (!(denominator > PIVOT_TOLERANCE * raw)) continue;
    const numerator = a + b * tau;
    const sse = Math.max(0, sst - (numerator * numerator) / denominator);
    if (onPoint) onPoint(tau, sse);
    if (sse < bestSse) {
      bestSse = sse;
      bestTau = tau;
    }
  }
  if (!Number.isFinite(bestSse)) return false;
  out.tau = bestTau;
  out.sse = bestSse;
  return true;
}
