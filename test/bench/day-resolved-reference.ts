/**
 * The plain reference the exact day-resolved search is benchmarked against:
 * a fixed temperature grid with a weighted least-squares refit at every grid
 * point (5P: every pair cH ≤ cC), then a local polish of the best one.
 *
 * Plain, but done as a careful plain implementation would do it:
 *   1. once per grid value, each reading's degree-days per day at that base,
 *      heating (1/m)·Σ(τ − T_d)₊ and cooling (1/m)·Σ(T_d − τ)₊ over its m
 *      days, and the segment weights (each reading counted by the share of
 *      its days at or below / at or above the value, a day on the value in
 *      both);
 *   2. at every grid point (pair) the engine's segment rule (every segment
 *      keeps at least k readings' worth of days), then a refit: the weighted
 *      normal equations of [1, hinge column(s)], solved by elimination, and
 *      the SSE Σ w·(y − ŷ)² from the residuals;
 *   3. golden-section on each changepoint in turn within one grid step of the
 *      best grid point (one round for one changepoint, a few for the 5P),
 *      each trial with its columns computed from the days.
 * No knowledge of where the optimum lies is used.
 *
 * The grid values are whole multiples of the step written as i / (1/step),
 * so a grid value equal to a reported temperature (to 0.1°) is that
 * temperature exactly and the on-changepoint rule sees it.
 */
import { performance } from 'node:perf_hooks';
import type { Period } from '../../src/engine/index.js';
import { goldenMinimum } from '../support/golden-section.js';

export type HingeShape = '3PC' | '3PH' | '4P' | '5P';

export interface ReferenceResult {
  /** After the polish. */
  heating: number | null;
  cooling: number | null;
  sse: number;
  /** The best grid point before the polish. */
  grid: { heating: number | null; cooling: number | null; sse: number };
  /** Grid values over the range of the daily temperatures. */
  gridValues: number;
  /** Grid points (5P: pairs) visited, and how many passed the segment rule and were refitted. */
  pointsVisited: number;
  pointsRefitted: number;
  /** Milliseconds of each phase of this run. */
  phaseMs: { columns: number; grid: number; polish: number };
}

/** The readings as the reference sees them: weight, use per day and each reading's days. */
interface Readings {
  n: number;
  w: Float64Array;
  y: Float64Array;
  temps: Float64Array[];
}

function readingsOf(periods: readonly Period[]): Readings {
  const temps = periods.map((period) => {
    if (!period.dayTemps || period.dayTemps.length === 0)
      throw new RangeError('the reference needs the daily temperatures of every period');
    return Float64Array.from(period.dayTemps);
  });
  return {
    n: periods.length,
    w: Float64Array.from(periods, (p) => p.days),
    y: Float64Array.from(periods, (p) => p.usePerDay),
    temps,
  };
}

/** Grid values i/perDegree from just below the coldest day to just above the warmest. */
export function referenceGrid(periods: readonly Period[], step: number): number[] {
  const perDegree = Math.round(1 / step);
  if (Math.abs(perDegree * step - 1) > 1e-12) throw new RangeError(`the grid step must divide one degree, got ${step}`);
  let min = Number.POSITIVE_INFINITY;
  let max = Number.NEGATIVE_INFINITY;
  for (const period of periods) {
    for (const temp of period.dayTemps ?? []) {
      if (temp < min) min = temp;
      if (temp > max) max = temp;
    }
  }
  const low = Math.floor(min * perDegree);
  const high = Math.ceil(max * perDegree);
  return Array.from({ length: high - low + 1 }, (_, i) => (low + i) / perDegree);
}

// ---- columns and segment weights at one base --------------------------------

function heatingColumn(readings: Readings, base: number, into: Float64Array, offset: number): void {
  for (let b = 0; b < readings.n; b++) {
    const temps = readings.temps[b]!;
    let sum = 0;
    for (let d = 0; d < temps.length; d++) if (temps[d]! < base) sum += base - temps[d]!;
    into[offset + b] = sum / temps.length;
  }
}

function coolingColumn(readings: Readings, base: number, into: Float64Array, offset: number): void {
  for (let b = 0; b < readings.n; b++) {
    const temps = readings.temps[b]!;
    let sum = 0;
    for (let d = 0; d < temps.length; d++) if (temps[d]! > base) sum += temps[d]! - base;
    into[offset + b] = sum / temps.length;
  }
}

/** Readings' worth of days at or below `base` and at or above it (a day on it counts in both). */
function segmentWeights(readings: Readings, base: number): { atOrBelow: number; atOrAbove: number } {
  let atOrBelow = 0;
  let atOrAbove = 0;
  for (let b = 0; b < readings.n; b++) {
    const temps = readings.temps[b]!;
    let below = 0;
    let above = 0;
    for (let d = 0; d < temps.length; d++) {
      if (temps[d]! <= base) below++;
      if (temps[d]! >= base) above++;
    }
    atOrBelow += below / temps.length;
    atOrAbove += above / temps.length;
  }
  return { atOrBelow, atOrAbove };
}

/** Readings' worth of days in [low, high]. */
function weightBetween(readings: Readings, low: number, high: number): number {
  let total = 0;
  for (let b = 0; b < readings.n; b++) {
    const temps = readings.temps[b]!;
    let inside = 0;
    for (let d = 0; d < temps.length; d++) if (temps[d]! >= low && temps[d]! <= high) inside++;
    total += inside / temps.length;
  }
  return total;
}

/** The engine's rounding slack when a sum of day shares is compared with a whole number of readings. */
const WEIGHT_SLACK = 1e-9;
const enough = (weight: number, k: number): boolean => weight >= k - WEIGHT_SLACK;

// ---- the refit ----------------------------------------------------------------

/** Relative pivot below which the normal equations count as singular. */
const PIVOT = 1e-12;

/** Weighted least squares of y on [1, h]: the SSE from the residuals, +∞ when singular. */
function refitOne(readings: Readings, h: Float64Array, ho: number): number {
  const { n, w, y } = readings;
  let s0 = 0,
    s1 = 0,
    s11 = 0,
    sy = 0,
    s1y = 0;
  for (let b = 0; b < n; b++) {
    const wb = w[b]!;
    const x = h[ho + b]!;
    s0 += wb;
    s1 += wb * x;
    s11 += wb * x * x;
    sy += wb * y[b]!;
    s1y += wb * x * y[b]!;
  }
  const det = s0 * s11 - s1 * s1;
  if (!(det > PIVOT * s0 * s11)) return Number.POSITIVE_INFINITY;
  const slope = (s0 * s1y - s1 * sy) / det;
  const intercept = (sy - slope * s1) / s0;
  let sse = 0;
  for (let b = 0; b < n; b++) {
    const r = y[b]! - intercept - slope * h[ho + b]!;
    sse += w[b]! * r * r;
  }
  return sse;
}

/**
 * Weighted least squares of y on [1, h, c]: the normal equations solved by
 * elimination (the intercept first; no pivoting needed, the matrix is
 * symmetric positive definite), the SSE from the residuals, +∞ when singular.
 */
function refitTwo(readings: Readings, h: Float64Array, ho: number, c: Float64Array, co: number): number {
  const { n, w, y } = readings;
  let s0 = 0,
    sh = 0,
    sc = 0,
    shh = 0,
    shc = 0,
    scc = 0,
    sy = 0,
    shy = 0,
    scy = 0;
  for (let b = 0; b < n; b++) {
    const wb = w[b]!;
    const xh = h[ho + b]!;
    const xc = c[co + b]!;
    const yb = y[b]!;
    s0 += wb;
    sh += wb * xh;
    sc += wb * xc;
    shh += wb * xh * xh;
    shc += wb * xh * xc;
    scc += wb * xc * xc;
    sy += wb * yb;
    shy += wb * xh * yb;
    scy += wb * xc * yb;
  }
  // Eliminate the intercept: the 2 × 2 system left in the hinge columns.
  const hh = shh - (sh * sh) / s0;
  const hc = shc - (sh * sc) / s0;
  const cc = scc - (sc * sc) / s0;
  const hy = shy - (sh * sy) / s0;
  const cy = scy - (sc * sy) / s0;
  const det = hh * cc - hc * hc;
  if (!(hh > PIVOT * shh) || !(cc > PIVOT * scc) || !(det > PIVOT * hh * cc)) return Number.POSITIVE_INFINITY;
  const bh = (cc * hy - hc * cy) / det;
  const bc = (hh * cy - hc * hy) / det;
  const b0 = (sy - bh * sh - bc * sc) / s0;
  let sse = 0;
  for (let b = 0; b < n; b++) {
    const r = y[b]! - b0 - bh * h[ho + b]! - bc * c[co + b]!;
    sse += w[b]! * r * r;
  }
  return sse;
}

/**
 * SSE of the shape with its changepoint(s) at arbitrary temperatures, the
 * columns computed from the days: +∞ where the segment rule fails or the
 * refit is singular. (The polish uses it; so does the bench's check of the
 * exact fit's SSE at its own changepoints.)
 */
export function referenceSse(
  shape: HingeShape,
  periods: readonly Period[],
  heating: number | null,
  cooling: number | null,
  k: number,
): number {
  return sseAt(readingsOf(periods), shape, heating, cooling, k);
}

function sseAt(
  readings: Readings,
  shape: HingeShape,
  heating: number | null,
  cooling: number | null,
  k: number,
): number {
  const n = readings.n;
  const h = new Float64Array(n);
  const c = new Float64Array(n);
  if (shape === '5P') {
    if (heating === null || cooling === null || !(heating <= cooling)) return Number.POSITIVE_INFINITY;
    if (!enough(segmentWeights(readings, heating).atOrBelow, k)) return Number.POSITIVE_INFINITY;
    if (!enough(segmentWeights(readings, cooling).atOrAbove, k)) return Number.POSITIVE_INFINITY;
    if (!enough(weightBetween(readings, heating, cooling), k)) return Number.POSITIVE_INFINITY;
    heatingColumn(readings, heating, h, 0);
    coolingColumn(readings, cooling, c, 0);
    return refitTwo(readings, h, 0, c, 0);
  }
  const tau = shape === '3PC' ? cooling : heating;
  if (tau === null) return Number.POSITIVE_INFINITY;
  const weights = segmentWeights(readings, tau);
  if (!enough(weights.atOrBelow, k) || !enough(weights.atOrAbove, k)) return Number.POSITIVE_INFINITY;
  if (shape === '3PC') {
    coolingColumn(readings, tau, c, 0);
    return refitOne(readings, c, 0);
  }
  heatingColumn(readings, tau, h, 0);
  if (shape === '3PH') return refitOne(readings, h, 0);
  coolingColumn(readings, tau, c, 0);
  return refitTwo(readings, h, 0, c, 0);
}

// ---- the polish -----------------------------------------------------------------

/** Golden-section steps per changepoint, and rounds over the changepoints (the 5P's two interact). */
const POLISH_ITERATIONS = 60;
const POLISH_ROUNDS: Record<HingeShape, number> = { '3PC': 1, '3PH': 1, '4P': 1, '5P': 4 };

// ---- the search -------------------------------------------------------------------

/** The grid (5P: every pair cH ≤ cC) with a refit at each point, then the polish. */
export function referenceSearch(
  shape: HingeShape,
  periods: readonly Period[],
  step: number,
  k: number,
): ReferenceResult | null {
  const t0 = performance.now();
  const readings = readingsOf(periods);
  const grid = referenceGrid(periods, step);
  const n = readings.n;
  const count = grid.length;
  const needHeating = shape !== '3PC';
  const needCooling = shape !== '3PH';
  const heat = new Float64Array(needHeating ? count * n : 0);
  const cool = new Float64Array(needCooling ? count * n : 0);
  const atOrBelow = new Float64Array(count);
  const atOrAbove = new Float64Array(count);
  for (let i = 0; i < count; i++) {
    const base = grid[i]!;
    if (needHeating) heatingColumn(readings, base, heat, i * n);
    if (needCooling) coolingColumn(readings, base, cool, i * n);
    const weights = segmentWeights(readings, base);
    atOrBelow[i] = weights.atOrBelow;
    atOrAbove[i] = weights.atOrAbove;
  }
  const t1 = performance.now();

  let best: { heating: number | null; cooling: number | null; sse: number } | null = null;
  let visited = 0;
  let refitted = 0;
  const offer = (heating: number | null, cooling: number | null, sse: number): void => {
    refitted++;
    if (Number.isFinite(sse) && (best === null || sse < best.sse)) best = { heating, cooling, sse };
  };
  if (shape === '5P') {
    for (let i = 0; i < count; i++) {
      if (!enough(atOrBelow[i]!, k)) {
        visited += count - i;
        continue;
      }
      for (let j = i; j < count; j++) {
        visited++;
        if (!enough(atOrAbove[j]!, k)) continue;
        // Days in [grid i, grid j] = days at or below j minus days strictly below i.
        if (!enough(atOrBelow[j]! - (n - atOrAbove[i]!), k)) continue;
        offer(grid[i]!, grid[j]!, refitTwo(readings, heat, i * n, cool, j * n));
      }
    }
  } else {
    for (let i = 0; i < count; i++) {
      visited++;
      if (!enough(atOrBelow[i]!, k) || !enough(atOrAbove[i]!, k)) continue;
      const tau = grid[i]!;
      if (shape === '3PC') offer(null, tau, refitOne(readings, cool, i * n));
      else if (shape === '3PH') offer(tau, null, refitOne(readings, heat, i * n));
      else offer(tau, tau, refitTwo(readings, heat, i * n, cool, i * n));
    }
  }
  const t2 = performance.now();
  if (best === null) return null;
  const gridBest: { heating: number | null; cooling: number | null; sse: number } = best;

  let current = { ...gridBest };
  for (let round = 0; round < POLISH_ROUNDS[shape]; round++) {
    if (current.heating !== null) {
      const cooling = current.cooling;
      const f =
        shape === '4P'
          ? (x: number) => sseAt(readings, shape, x, x, k)
          : (x: number) => sseAt(readings, shape, x, cooling, k);
      const found = goldenMinimum(f, current.heating - step, current.heating + step, POLISH_ITERATIONS);
      if (found.value < current.sse)
        current = { heating: found.x, cooling: shape === '4P' ? found.x : current.cooling, sse: found.value };
    }
    if (current.cooling !== null && shape !== '4P') {
      const heating = current.heating;
      const found = goldenMinimum(
        (x) => sseAt(readings, shape, heating, x, k),
        current.cooling - step,
        current.cooling + step,
        POLISH_ITERATIONS,
      );
      if (found.value < current.sse) current = { heating: current.heating, cooling: found.x, sse: found.value };
    }
  }
  const t3 = performance.now();
  return {
    heating: current.heating,
    cooling: current.cooling,
    sse: current.sse,
    grid: gridBest,
    gridValues: count,
    pointsVisited: visited,
    pointsRefitted: refitted,
    phaseMs: { columns: t1 - t0, grid: t2 - t1, polish: t3 - t2 },
  };
}
