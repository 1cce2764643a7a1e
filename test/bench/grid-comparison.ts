/**
 * The exact changepoint search against the plain fine-grid search of
 * test/support/grid-search.ts (0.1° steps, weighted least squares refitted at
 * every grid point), shape by shape on the same periods.
 *
 * The exact side is timed through the public fitShape (search, regression,
 * statistics and changepoint errors); the grid side does the changepoint
 * search only. Any bias therefore favours the grid.
 */
import { fitShape, type Period } from '../../src/engine/index.js';
import { gridSearch, temperatureGrid, type GridOptimum } from '../support/grid-search.js';
import { median, timeEach, timeOnce } from './timing.js';

export const HINGE_SHAPES = ['3PC', '3PH', '4P', '5P'] as const;
export type HingeShape = (typeof HINGE_SHAPES)[number];

export const GRID_STEP = 0.1;
const MIN_POINTS = 3; // the engine's default points per segment, used by both sides
/** Exact SSE counts as "not worse" when within this relative rounding of the grid's. */
export const SSE_RELATIVE_TOLERANCE = 1e-9;

export interface ShapeComparison {
  shape: HingeShape;
  exactMedianMs: number;
  exactRuns: number;
  gridMs: number;
  /** How gridMs was obtained. */
  gridTiming: 'median' | 'one run' | 'estimate';
  gridRuns: number;
  gridPoints: number;
  ratio: number;
  exactSse: number;
  gridSse: number;
  exactNotWorse: boolean;
  exactChangepoints: (number | null)[];
  gridChangepoints: (number | null)[];
  note?: string;
}

export interface Columns {
  x: number[];
  y: number[];
  w: number[];
}

export function columns(periods: readonly Period[]): Columns {
  return { x: periods.map((p) => p.meanTemp), y: periods.map((p) => p.usePerDay), w: periods.map((p) => p.days) };
}

export interface ExactSide {
  medianMs: number;
  runs: number;
  sse: number;
  changepoints: (number | null)[];
}

/** The exact fit's SSE and changepoints, beside its already-measured median time. */
export function exactSide(periods: readonly Period[], shape: HingeShape, medianMs: number, runs: number): ExactSide {
  const fit = fitShape(periods, shape, MIN_POINTS);
  if (!fit.ok) throw new Error(`bench data: ${shape} could not be fitted (${fit.reason})`);
  return { medianMs, runs, sse: fit.sse, changepoints: [fit.changepoints.heating, fit.changepoints.cooling] };
}

function requireOptimum(optimum: GridOptimum | null, shape: HingeShape): GridOptimum {
  if (!optimum) throw new Error(`bench data: the grid found no feasible ${shape} changepoint`);
  return optimum;
}

function compare(
  shape: HingeShape,
  exact: ExactSide,
  grid: Omit<
    ShapeComparison,
    'shape' | 'exactMedianMs' | 'exactRuns' | 'ratio' | 'exactSse' | 'exactNotWorse' | 'exactChangepoints'
  >,
): ShapeComparison {
  return {
    shape,
    exactMedianMs: exact.medianMs,
    exactRuns: exact.runs,
    ...grid,
    ratio: grid.gridMs / exact.medianMs,
    exactSse: exact.sse,
    exactNotWorse: exact.sse <= grid.gridSse * (1 + SSE_RELATIVE_TOLERANCE),
    exactChangepoints: exact.changepoints,
  };
}

/** Grid timed as the median of `gridRuns` runs after `gridWarmUp` untimed ones. */
export function compareByMedian(
  periods: readonly Period[],
  shape: HingeShape,
  exact: ExactSide,
  gridRuns: number,
  gridWarmUp: number,
): ShapeComparison {
  const { x, y, w } = columns(periods);
  const grid = temperatureGrid(x, GRID_STEP);
  const optimum = requireOptimum(gridSearch(shape, x, y, w, GRID_STEP, MIN_POINTS, grid), shape);
  const times = timeEach(() => gridSearch(shape, x, y, w, GRID_STEP, MIN_POINTS, grid), gridRuns, gridWarmUp);
  return compare(shape, exact, {
    gridMs: median(times),
    gridTiming: 'median',
    gridRuns,
    gridPoints: grid.length,
    gridSse: optimum.sse,
    gridChangepoints: [optimum.heating, optimum.cooling],
  });
}

/** Grid timed by one run (its own result is the one compared). */
export function compareByOneRun(periods: readonly Period[], shape: HingeShape, exact: ExactSide): ShapeComparison {
  const { x, y, w } = columns(periods);
  const grid = temperatureGrid(x, GRID_STEP);
  const { ms, result } = timeOnce(() => gridSearch(shape, x, y, w, GRID_STEP, MIN_POINTS, grid));
  const optimum = requireOptimum(result, shape);
  return compare(shape, exact, {
    gridMs: ms,
    gridTiming: 'one run',
    gridRuns: 1,
    gridPoints: grid.length,
    gridSse: optimum.sse,
    gridChangepoints: [optimum.heating, optimum.cooling],
  });
}

/**
 * The 5P grid on many points visits every (heating, cooling) pair of grid
 * values: too slow to run in full when it would take longer than
 * `budgetMs`. It is first run on a reduced grid range (the full grid's points
 * from 1° below the exact heating changepoint to 1° above the exact cooling
 * one), which gives a cost per pair; if the full grid's pair count times that
 * cost fits the budget the full grid is run once, otherwise the estimate is
 * reported with the reduced range's SSE.
 */
export function compareFivePointWithinBudget(
  periods: readonly Period[],
  exact: ExactSide,
  budgetMs: number,
): ShapeComparison {
  const { x, y, w } = columns(periods);
  const fullGrid = temperatureGrid(x, GRID_STEP);
  const [cH, cC] = exact.changepoints;
  if (cH == null || cC == null) throw new Error('bench data: the exact 5P has no changepoints');
  const low = Math.floor(cH) - 1;
  const high = Math.ceil(cC) + 1;
  const window = fullGrid.filter((t) => t >= low - 1e-9 && t <= high + 1e-9);
  const pairs = (m: number): number => (m * (m + 1)) / 2;
  const reduced = timeOnce(() => gridSearch('5P', x, y, w, GRID_STEP, MIN_POINTS, window));
  const reducedOptimum = requireOptimum(reduced.result, '5P');
  const msPerPair = reduced.ms / pairs(window.length);
  const estimateMs = msPerPair * pairs(fullGrid.length);
  const rangeText = `${low}–${high}°`;
  if (estimateMs > budgetMs) {
    return compare('5P', exact, {
      gridMs: estimateMs,
      gridTiming: 'estimate',
      gridRuns: 0,
      gridPoints: fullGrid.length,
      gridSse: reducedOptimum.sse,
      gridChangepoints: [reducedOptimum.heating, reducedOptimum.cooling],
      note:
        `full grid not run (estimated ${(estimateMs / 1000).toFixed(0)} s > ${(budgetMs / 1000).toFixed(0)} s budget): ` +
        `time = ${pairs(window.length)} pairs on the reduced range ${rangeText} (${reduced.ms.toFixed(0)} ms) scaled to the full grid's ` +
        `${pairs(fullGrid.length)} pairs; grid SSE from that reduced range (the full grid could only match or lower it)`,
    });
  }
  const full = timeOnce(() => gridSearch('5P', x, y, w, GRID_STEP, MIN_POINTS, fullGrid));
  const optimum = requireOptimum(full.result, '5P');
  return compare('5P', exact, {
    gridMs: full.ms,
    gridTiming: 'one run',
    gridRuns: 1,
    gridPoints: fullGrid.length,
    gridSse: optimum.sse,
    gridChangepoints: [optimum.heating, optimum.cooling],
    note:
      `full grid run once (${pairs(fullGrid.length)} pairs; pre-run estimate from the reduced range ${rangeText} was ` +
      `${(estimateMs / 1000).toFixed(1)} s, within the ${(budgetMs / 1000).toFixed(0)} s budget)`,
  });
}
