/**
 * Out-of-sample goodness of fit: each block of periods predicted by the
 * model refitted without it, and CV(RMSE) and NMBE taken over those
 * predictions.
 *
 * In-sample NMBE of a least-squares fit with an intercept is zero by
 * construction, and in-sample CV(RMSE) rewards every extra parameter; the
 * out-of-sample figures can fail. Blocks: each period on its own for bills
 * (leave-one-period-out), calendar months for daily data (a day's neighbours
 * share its weather and its noise, so leaving out one day at a time would
 * flatter the model: blocked cross-validation). The changepoints stay where
 * the full fit put them and the linear coefficients are refitted, which is
 * exact for the linear part and slightly kind to the changepoints (they were
 * placed with the left-out block seen).
 *
 * No refit is actually run: the residuals of block B under the fit without
 * it are (I − X_B·A⁻¹·X_Bᵀ·W_B)⁻¹·r_B, with A = XᵀWX and r_B the block's
 * full-fit residuals (the block form of the leave-one-out PRESS residual
 * r_i/(1 − h_ii)), so every block costs a system of its own size.
 */
export type OutOfSampleMethod = 'leave-one-period-out' | 'blocked-by-month';

export interface OutOfSampleInput {
  /** Design rows of the fitted model, in time order. */
  design: readonly (readonly number[])[];
  usePerDay: readonly number[];
  days: readonly number[];
  quantity: readonly number[];
  /** Block of each row; rows of one block are left out together. */
  blocks: readonly string[];
}

export interface OutOfSampleStatistics {
  method: OutOfSampleMethod;
  blocks: number;
  /** √(Σe²/n)/Ē over the left-out predictions, e = quantity − days·ŷ. NaN when not available. */
  cvrmse: number;
  /** Σe/(n·Ē) over the left-out predictions. NaN when not available. */
  nmbe: number;
  /** Why the figures are not available (a block without which the model is not identified), else null. */
  unavailable: string | null;
}

/** Bills (median period of 7 days or more) are left out one by one, daily data by calendar month. */
export const BILL_DAYS_FOR_LEAVE_ONE_OUT = 7;

/** A pivot below this share of the block's diagonal means the rest of the data cannot identify the model. */
const SINGULAR = 1e-9;

/**
 * The blocks for a set of periods in time order, and the method they stand for.
 * @example outOfSampleBlocks([{ start: '2024-01-01', days: 31 }, { start: '2024-02-01', days: 29 }]).method // "leave-one-period-out" — bills of 29 days and more are left out one by one (source: the rule above, set by this engine)
 */
export function outOfSampleBlocks(periods: readonly { start: string; days: number }[]): {
  method: OutOfSampleMethod;
  blocks: string[];
} {
  const lengths = periods.map((p) => p.days).sort((a, b) => a - b);
  const median = lengths[Math.floor(lengths.length / 2)] ?? 1;
  if (median >= BILL_DAYS_FOR_LEAVE_ONE_OUT)
    return { method: 'leave-one-period-out', blocks: periods.map((p) => p.start) };
  return { method: 'blocked-by-month', blocks: periods.map((p) => p.start.slice(0, 7)) };
}

/**
 * Out-of-sample CV(RMSE) and NMBE, each block predicted by the linear
 * coefficients refitted without it. `inverse` is (XᵀWX)⁻¹ of the full fit
 * and `coefficients` its solution (both as the regression returned them).
 * @example outOfSampleFit({ design: [[1], [1], [1]], usePerDay: [1, 2, 3], days: [1, 1, 1], quantity: [1, 2, 3], blocks: ['a', 'b', 'c'] }, 'leave-one-period-out', [[1 / 3]], [2]).cvrmse // 0.6123… — each value predicted by the mean of the other two: √((1.5² + 0² + 1.5²)/3)/2 (source: by hand)
 */
export function outOfSampleFit(
  input: OutOfSampleInput,
  method: OutOfSampleMethod,
  inverse: readonly (readonly number[])[],
  coefficients: readonly number[],
): OutOfSampleStatistics {
  const { design, usePerDay, days, quantity, blocks } = input;
  const n = design.length;
  const k = coefficients.length;
  // Members of each block, in order of first appearance.
  const members = new Map<string, number[]>();
  for (let i = 0; i < n; i++) {
    const list = members.get(blocks[i]!);
    if (list) list.push(i);
    else members.set(blocks[i]!, [i]);
  }
  // Each row's full-fit residual (per day) and A⁻¹xᵢ.
  const residual = new Float64Array(n);
  const projected: Float64Array[] = [];
  for (let i = 0; i < n; i++) {
    const row = design[i]!;
    let fitted = 0;
    for (let j = 0; j < k; j++) fitted += row[j]! * coefficients[j]!;
    residual[i] = usePerDay[i]! - fitted;
    const p = new Float64Array(k);
    for (let a = 0; a < k; a++) {
      let sum = 0;
      for (let b = 0; b < k; b++) sum += inverse[a]![b]! * row[b]!;
      p[a] = sum;
    }
    projected.push(p);
  }
  let sumSquares = 0;
  let sum = 0;
  for (const [block, rows] of members) {
    const m = rows.length;
    // M = I − X_B·A⁻¹·X_Bᵀ·W_B, solved against r_B by Gaussian elimination with partial pivoting.
    const matrix = new Float64Array(m * m);
    const rhs = new Float64Array(m);
    for (let a = 0; a < m; a++) {
      const pa = projected[rows[a]!]!;
      for (let b = 0; b < m; b++) {
        const xb = design[rows[b]!]!;
        let h = 0;
        for (let j = 0; j < k; j++) h += xb[j]! * pa[j]!;
        matrix[a * m + b] = (a === b ? 1 : 0) - h * days[rows[b]!]!;
      }
      rhs[a] = residual[rows[a]!]!;
    }
    const solved = solveInPlace(matrix, rhs, m);
    if (!solved) {
      return {
        method,
        blocks: members.size,
        cvrmse: Number.NaN,
        nmbe: Number.NaN,
        unavailable: `without ${method === 'blocked-by-month' ? `the month ${block}` : `the period starting ${block}`} the model is not identified (its other periods leave a changepoint segment empty)`,
      };
    }
    for (let a = 0; a < m; a++) {
      const energy = days[rows[a]!]! * rhs[a]!;
      sumSquares += energy * energy;
      sum += energy;
    }
  }
  let totalQuantity = 0;
  for (const q of quantity) totalQuantity += q;
  const meanQuantity = totalQuantity / n;
  return {
    method,
    blocks: members.size,
    cvrmse: Math.sqrt(sumSquares / n) / meanQuantity,
    nmbe: sum / (n * meanQuantity),
    unavailable: null,
  };
}

/** Solve M·x = b in place (x in b); false when M is singular to working precision. */
function solveInPlace(matrix: Float64Array, rhs: Float64Array, m: number): boolean {
  if (m === 1) {
    const pivot = matrix[0]!;
    if (!(Math.abs(pivot) > SINGULAR)) return false;
    rhs[0] = rhs[0]! / pivot;
    return true;
  }
  for (let col = 0; col < m; col++) {
    let pivotRow = col;
    for (let r = col + 1; r < m; r++)
      if (Math.abs(matrix[r * m + col]!) > Math.abs(matrix[pivotRow * m + col]!)) pivotRow = r;
    const pivot = matrix[pivotRow * m + col]!;
    if (!(Math.abs(pivot) > SINGULAR)) return false;
    if (pivotRow !== col) {
      for (let c = 0; c < m; c++) {
        const t = matrix[col * m + c]!;
        matrix[col * m + c] = matrix[pivotRow * m + c]!;
        matrix[pivotRow * m + c] = t;
      }
      const t = rhs[col]!;
      rhs[col] = rhs[pivotRow]!;
      rhs[pivotRow] = t;
    }
    for (let r = col + 1; r < m; r++) {
      const factor = matrix[r * m + col]! / pivot;
      if (factor === 0) continue;
      for (let c = col; c < m; c++) matrix[r * m + c] = matrix[r * m + c]! - factor * matrix[col * m + c]!;
      rhs[r] = rhs[r]! - factor * rhs[col]!;
    }
  }
  for (let r = m - 1; r >= 0; r--) {
    let value = rhs[r]!;
    for (let c = r + 1; c < m; c++) value -= matrix[r * m + c]! * rhs[c]!;
    rhs[r] = value / matrix[r * m + r]!;
  }
  return true;
}
