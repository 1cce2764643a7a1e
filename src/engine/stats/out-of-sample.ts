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
 */
import { invertMatrix, multiplyMatrixVector } from '../fit/matrix.js';

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

/** The blocks for a set of periods in time order, and the method they stand for. */
export function outOfSampleBlocks(periods: readonly { start: string; days: number }[]): { method: OutOfSampleMethod; blocks: string[] } {
  const lengths = periods.map((p) => p.days).sort((a, b) => a - b);
  const median = lengths[Math.floor(lengths.length / 2)] ?? 1;
  if (median >= BILL_DAYS_FOR_LEAVE_ONE_OUT) return { method: 'leave-one-period-out', blocks: periods.map((p) => p.start) };
  return { method: 'blocked-by-month', blocks: periods.map((p) => p.start.slice(0, 7)) };
}

/**
 * Out-of-sample CV(RMSE) and NMBE by refitting the linear coefficients
 * without each block (the Gram matrix less the block's part).
 * @example outOfSampleFit({ design: [[1], [1], [1]], usePerDay: [1, 2, 3], days: [1, 1, 1], quantity: [1, 2, 3], blocks: ['a', 'b', 'c'] }, 'leave-one-period-out').cvrmse // √((1.5² + 0² + 1.5²)/3)/2 ≈ 0.612
 */
export function outOfSampleFit(input: OutOfSampleInput, method: OutOfSampleMethod): OutOfSampleStatistics {
  const { design, usePerDay, days, quantity, blocks } = input;
  const n = design.length;
  const k = design[0]?.length ?? 0;
  const gram = Array.from({ length: k }, () => new Array<number>(k).fill(0));
  const rhs = new Array<number>(k).fill(0);
  const byBlock = new Map<string, number[]>();
  for (let i = 0; i < n; i++) {
    const row = design[i]!;
    for (let a = 0; a < k; a++) {
      rhs[a]! += days[i]! * row[a]! * usePerDay[i]!;
      for (let b = 0; b < k; b++) gram[a]![b]! += days[i]! * row[a]! * row[b]!;
    }
    const members = byBlock.get(blocks[i]!) ?? [];
    members.push(i);
    byBlock.set(blocks[i]!, members);
  }
  let sumSquares = 0;
  let sum = 0;
  let totalQuantity = 0;
  for (const [block, members] of byBlock) {
    const reduced = gram.map((row) => [...row]);
    const reducedRhs = [...rhs];
    for (const i of members) {
      const row = design[i]!;
      for (let a = 0; a < k; a++) {
        reducedRhs[a]! -= days[i]! * row[a]! * usePerDay[i]!;
        for (let b = 0; b < k; b++) reduced[a]![b]! -= days[i]! * row[a]! * row[b]!;
      }
    }
    const inverse = invertMatrix(reduced, 1e-10);
    if (!inverse) {
      return {
        method,
        blocks: byBlock.size,
        cvrmse: Number.NaN,
        nmbe: Number.NaN,
        unavailable: `without ${method === 'blocked-by-month' ? `the month ${block}` : `the period starting ${block}`} the model is not identified (its other periods leave a changepoint segment empty)`,
      };
    }
    const coefficients = multiplyMatrixVector(inverse, reducedRhs);
    for (const i of members) {
      const predicted = design[i]!.reduce((acc, value, j) => acc + value * coefficients[j]!, 0);
      const residual = quantity[i]! - days[i]! * predicted;
      sumSquares += residual * residual;
      sum += residual;
    }
  }
  for (const q of quantity) totalQuantity += q;
  const meanQuantity = totalQuantity / n;
  return { method, blocks: byBlock.size, cvrmse: Math.sqrt(sumSquares / n) / meanQuantity, nmbe: sum / (n * meanQuantity), unavailable: null };
}
