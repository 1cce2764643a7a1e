/**
 * The plain reference the exact search is checked and benchmarked against:
 * try every changepoint on a fixed temperature grid, refit by weighted least
 * squares at each, keep the lowest SSE. Deliberately simple and slow.
 */
import { weightedLeastSquares } from '../../src/engine/fit/wls.js';
import { designRow } from '../../src/engine/fit/shape-model.js';
import type { ModelName } from '../../src/engine/types.js';

export interface GridOptimum {
  heating: number | null;
  cooling: number | null;
  sse: number;
}

/**
 * Segment-size rule shared with the exact search: ≥ k points at or below the
 * lower changepoint, at or above the upper one, and (5P) between them.
 */
function feasible(x: readonly number[], k: number, cH: number | null, cC: number | null, model5P: boolean): boolean {
  const low = cH ?? cC!;
  const high = cC ?? cH!;
  const atOrBelow = x.filter((v) => v <= low).length;
  const atOrAbove = x.filter((v) => v >= high).length;
  if (atOrBelow < k || atOrAbove < k) return false;
  if (model5P) return x.filter((v) => v >= cH! && v <= cC!).length >= k;
  return true;
}

function sseAt(
  model: ModelName,
  x: readonly number[],
  y: readonly number[],
  w: readonly number[],
  cH: number | null,
  cC: number | null,
): number {
  const design = x.map((v) => designRow(model, { heating: cH, cooling: cC }, v));
  return weightedLeastSquares(design, y, w)?.sse ?? Number.POSITIVE_INFINITY;
}

/** Grid points from the lowest to the highest temperature, `step` apart (integer-indexed to avoid drift). */
export function temperatureGrid(x: readonly number[], step: number): number[] {
  const low = Math.floor(Math.min(...x) / step);
  const high = Math.ceil(Math.max(...x) / step);
  return Array.from({ length: high - low + 1 }, (_, i) => (low + i) * step);
}

export function gridSearch(
  model: '3PC' | '3PH' | '4P' | '5P',
  x: readonly number[],
  y: readonly number[],
  w: readonly number[],
  step: number,
  minPoints: number,
  grid: readonly number[] = temperatureGrid(x, step),
): GridOptimum | null {
  let best: GridOptimum | null = null;
  const offer = (cH: number | null, cC: number | null): void => {
    if (!feasible(x, minPoints, cH, cC, model === '5P')) return;
    const sse = sseAt(model, x, y, w, cH, cC);
    if (!best || sse < best.sse) best = { heating: cH, cooling: cC, sse };
  };
  if (model === '5P') {
    for (let i = 0; i < grid.length; i++) for (let j = i; j < grid.length; j++) offer(grid[i]!, grid[j]!);
  } else {
    for (const c of grid) offer(model === '3PC' ? null : c, model === '3PH' ? null : c);
  }
  return best;
}
