/**
 * The plain reference the exact day-resolved search is checked and
 * benchmarked against: every changepoint (pair) on a fixed temperature grid,
 * each reading's degree-days per day computed from its days at that base,
 * a weighted least-squares refit at each, then a local polish of the best
 * grid point (golden-section steps on each changepoint within one grid step).
 * Deliberately simple and slow. The feasibility rule is the engine's: every
 * segment keeps at least k readings' worth of days, each reading counted by
 * the share of its days in the segment (a day on a changepoint in both).
 */
import { weightedLeastSquares } from '../../src/engine/fit/wls.js';
import { designRowWithVariables } from '../../src/engine/fit/variable-columns.js';
import type { Period } from '../../src/engine/types.js';
import { goldenMinimum } from './golden-section.js';

export interface DayGridOptimum {
  heating: number | null;
  cooling: number | null;
  sse: number;
}

type Shape = '3PC' | '3PH' | '4P' | '5P';

function weight(periods: readonly Period[], test: (t: number) => boolean): number {
  return periods.reduce((sum, p) => sum + p.dayTemps!.filter(test).length / p.dayTemps!.length, 0);
}

function feasible(periods: readonly Period[], k: number, shape: Shape, cH: number | null, cC: number | null): boolean {
  const low = cH ?? cC!;
  const high = cC ?? cH!;
  if (shape === '5P' && !(low <= high)) return false;
  const slack = 1e-9;
  if (weight(periods, (v) => v <= low) < k - slack || weight(periods, (v) => v >= high) < k - slack) return false;
  if (shape === '5P') return weight(periods, (v) => v >= low && v <= high) >= k - slack;
  return true;
}

/** SSE of the day-resolved shape with its changepoints fixed, or +∞ where infeasible or singular. */
export function dayResolvedSse(
  shape: Shape,
  periods: readonly Period[],
  cH: number | null,
  cC: number | null,
  k: number,
  variables: readonly string[] = [],
): number {
  if (!feasible(periods, k, shape, cH, cC)) return Number.POSITIVE_INFINITY;
  const changepoints = { heating: cH, cooling: cC };
  const design = periods.map((p) => designRowWithVariables(shape, changepoints, p, 'daily', variables));
  const fit = weightedLeastSquares(
    design,
    periods.map((p) => p.usePerDay),
    periods.map((p) => p.days),
  );
  return fit?.sse ?? Number.POSITIVE_INFINITY;
}

/** Grid over the range of the days' temperatures, then a golden-section polish around the best point. */
export function dayResolvedGridSearch(
  shape: Shape,
  periods: readonly Period[],
  step: number,
  k: number,
  variables: readonly string[] = [],
): DayGridOptimum | null {
  const temps = periods.flatMap((p) => [...p.dayTemps!]);
  const low = Math.floor(Math.min(...temps) / step);
  const high = Math.ceil(Math.max(...temps) / step);
  const grid = Array.from({ length: high - low + 1 }, (_, i) => (low + i) * step);
  let best: DayGridOptimum | null = null;
  const offer = (cH: number | null, cC: number | null): void => {
    const sse = dayResolvedSse(shape, periods, cH, cC, k, variables);
    if (Number.isFinite(sse) && (!best || sse < best.sse)) best = { heating: cH, cooling: cC, sse };
  };
  if (shape === '5P') {
    for (let i = 0; i < grid.length; i++) for (let j = i; j < grid.length; j++) offer(grid[i]!, grid[j]!);
  } else {
    for (const c of grid) offer(shape === '3PC' ? null : c, shape === '3PH' ? null : c);
  }
  if (!best) return null;
  // Polish: golden-section on each changepoint in turn, within one grid step of where it is.
  let current: DayGridOptimum = best;
  for (let round = 0; round < (shape === '5P' ? 4 : 1); round++) {
    if (current.heating !== null) {
      const cC = shape === '4P' ? null : current.cooling;
      const result = goldenMinimum(
        (h) => dayResolvedSse(shape, periods, h, shape === '4P' ? h : cC, k, variables),
        current.heating - step,
        current.heating + step,
        60,
      );
      if (result.value < current.sse)
        current = { heating: result.x, cooling: shape === '4P' ? result.x : current.cooling, sse: result.value };
    }
    if (current.cooling !== null && shape !== '4P') {
      const cH = current.heating;
      const result = goldenMinimum(
        (c) => dayResolvedSse(shape, periods, cH, c, k, variables),
        current.cooling - step,
        current.cooling + step,
        60,
      );
      if (result.value < current.sse) current = { heating: current.heating, cooling: result.x, sse: result.value };
    }
  }
  return current;
}
