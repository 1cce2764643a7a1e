import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import { buildSortedSums } from '../../../src/engine/fit/sorted-sums.js';
import {
  searchChangepoints,
  type ChangepointOptimum,
  type HingeShape,
} from '../../../src/engine/fit/changepoint-search.js';
import { weightedLeastSquares } from '../../../src/engine/fit/wls.js';
import { designRow } from '../../../src/engine/fit/shape-model.js';
import { gridSearch, type GridOptimum } from '../../support/grid-search.js';
import { seededRandom } from '../../support/synthetic.js';

/**
 * The exact (Hudson) search against the plain grid reference in
 * test/support/grid-search.ts, on invented data that fast-check generates.
 * Expected relations:
 *   - the exact optimum is never worse than any grid point (it is the true
 *     least-squares optimum over the same feasible set);
 *   - where the exact changepoints sit on grid values, the grid reaches the
 *     same SSE;
 *   - noiseless hinge data give back their own changepoints (synthetic: the
 *     test sets the truth).
 */

/**
 * Σ w·y²: the scale of the data, for floating-point floors. Sums of squares
 * of data this size carry rounding of order 1e-16 × this, even when the SSE
 * itself is ~0 (noiseless or constant data).
 */
function dataScale(y: readonly number[], w: readonly number[]): number {
  return y.reduce((a, v, i) => a + w[i]! * v * v, 0);
}

/** 1e-9 relative is the requirement; the 1e-12·Σwy² floor only matters when the SSE is ~0. */
function tolerance(reference: number, scale: number): number {
  return 1e-9 * Math.abs(reference) + 1e-12 * scale;
}

function exactOptimum(
  shape: HingeShape,
  x: number[],
  y: number[],
  w: number[],
  minPoints: number,
): ChangepointOptimum | null {
  return searchChangepoints(buildSortedSums(x, y, w), shape, minPoints);
}

/** A grid optimum with a finite SSE, or null (the grid finds no feasible, non-singular point). */
function finiteGrid(result: GridOptimum | null): GridOptimum | null {
  return result && Number.isFinite(result.sse) ? result : null;
}

/** Every multiple of 1/`perDegree` from lowest to highest (integer-indexed, so k/10 data values are hit exactly). */
function gridFromUnits(lowUnits: number, highUnits: number, perDegree: number): number[] {
  return Array.from({ length: highUnits - lowUnits + 1 }, (_, i) => (lowUnits + i) / perDegree);
}

function isOnGrid(value: number | null, perDegree: number): boolean {
  return value === null || Math.abs(value * perDegree - Math.round(value * perDegree)) < 1e-9;
}

function refitSse(shape: HingeShape, optimum: ChangepointOptimum, x: number[], y: number[], w: number[]): number {
  const changepoints = { heating: optimum.heatingChangepoint, cooling: optimum.coolingChangepoint };
  const regression = weightedLeastSquares(
    x.map((v) => designRow(shape, changepoints, v)),
    y,
    w,
  );
  return regression?.sse ?? Number.POSITIVE_INFINITY;
}

interface RandomDataset {
  /** Temperatures in units of 1/unitsPerDegree °F. */
  units: number[];
  unitsPerDegree: number;
  x: number[];
  y: number[];
  w: number[];
  minPoints: number;
}

/**
 * Invented data: temperatures on a 1/unitsPerDegree grid inside [0, 100] °F
 * (sometimes bunched into a narrow band so many values tie), day weights
 * 1–31, and use per day from a random hinge model (slopes of either sign,
 * changepoints sometimes on a data point) plus scaled noise, or pure noise.
 */
function datasetArbitrary(
  shape: HingeShape,
  unitsPerDegree: number,
  maxSpanDegrees: number,
): fc.Arbitrary<RandomDataset> {
  const top = 100 * unitsPerDegree;
  return fc
    .record({
      n: fc.integer({ min: 8, max: 40 }),
      low: fc.integer({ min: 0, max: top }),
      span: fc.oneof(
        fc.integer({ min: 2, max: 5 * unitsPerDegree }),
        fc.integer({ min: 5 * unitsPerDegree, max: maxSpanDegrees * unitsPerDegree }),
      ),
      seed: fc.integer({ min: 0, max: 2 ** 31 - 1 }),
      minPoints: fc.integer({ min: 1, max: 5 }),
      kind: fc.constantFrom('hinge', 'hinge', 'hinge-at-point', 'noiseless-at-point', 'pure-noise'),
      noiseScale: fc.constantFrom(0.5, 5, 50),
    })
    .map(({ n, low, span, seed, minPoints, kind, noiseScale }) => {
      const random = seededRandom(seed);
      const start = Math.min(low, top - span);
      const units = Array.from({ length: n }, () => start + random.integer(0, span));
      const x = units.map((u) => u / unitsPerDegree);
      const w = Array.from({ length: n }, () => random.integer(1, 31));
      const sorted = [...x].sort((a, b) => a - b);
      const pick = (): number => sorted[random.integer(0, n - 1)]!;
      const inRange = (): number => (start + random.integer(0, span)) / unitsPerDegree;
      const atPoint = kind === 'hinge-at-point' || kind === 'noiseless-at-point';
      let c1 = atPoint ? pick() : inRange();
      let c2 = atPoint ? pick() : inRange();
      if (c1 > c2) [c1, c2] = [c2, c1];
      const cH = shape === '3PC' ? null : c1;
      const cC = shape === '3PH' ? null : shape === '4P' ? c1 : c2;
      const slopeH = (random.uniform() - 0.3) * 40;
      const slopeC = (random.uniform() - 0.3) * 40;
      const base = random.uniform() * 500;
      const noise = kind === 'noiseless-at-point' ? 0 : noiseScale;
      const y = x.map((v) => {
        const signal =
          kind === 'pure-noise'
            ? base
            : base +
              (cH === null ? 0 : slopeH * Math.max(cH - v, 0)) +
              (cC === null ? 0 : slopeC * Math.max(v - cC, 0));
        return signal + noise * random.normal();
      });
      return { units, unitsPerDegree, x, y, w, minPoints };
    });
}

/**
 * 5P on a grid under the engine's segment rule. The shared reference in
 * test/support/grid-search.ts also tries cH = cC without asking for any point
 * in the flat band, i.e. it lets a 4P stand in for a 5P; the engine (and its
 * documented rule) counts the points on [cH, cC] as the flat segment even
 * then. So 5P is compared here against the same plain grid with the engine's
 * rule: ≥ k points at or below cH, in [cH, cC], and at or above cC.
 */
function fivePointGrid(
  x: readonly number[],
  y: readonly number[],
  w: readonly number[],
  grid: readonly number[],
  k: number,
): GridOptimum | null {
  let best: GridOptimum | null = null;
  for (let i = 0; i < grid.length; i++) {
    const cH = grid[i]!;
    if (x.filter((v) => v <= cH).length < k) continue;
    for (let j = i; j < grid.length; j++) {
      const cC = grid[j]!;
      if (x.filter((v) => v >= cC).length < k) break;
      if (x.filter((v) => v >= cH && v <= cC).length < k) continue;
      const sse = weightedLeastSquares(
        x.map((v) => designRow('5P', { heating: cH, cooling: cC }, v)),
        y,
        w,
      )?.sse;
      if (sse !== undefined && Number.isFinite(sse) && (!best || sse < best.sse))
        best = { heating: cH, cooling: cC, sse };
    }
  }
  return best;
}

function checkAgainstGrid(shape: HingeShape, data: RandomDataset, gridPerDegree: number): { onGrid: boolean } {
  const { units, unitsPerDegree, x, y, w, minPoints } = data;
  const scale = dataScale(y, w);
  const factor = gridPerDegree / unitsPerDegree; // integer: every data value is a grid value
  const grid = gridFromUnits(Math.min(...units) * factor, Math.max(...units) * factor, gridPerDegree);
  const exact = exactOptimum(shape, x, y, w, minPoints);
  const reference =
    shape === '5P'
      ? fivePointGrid(x, y, w, grid, minPoints)
      : finiteGrid(gridSearch(shape, x, y, w, 1 / gridPerDegree, minPoints, grid));
  if (exact === null) {
    expect(reference, 'grid found a feasible point where the exact search found none').toBeNull();
    return { onGrid: false };
  }
  expect(reference, 'exact search found a feasible point where the grid found none').not.toBeNull();
  const gridSse = reference!.sse;
  expect(exact.sse, `exact ${exact.sse} vs grid ${gridSse}`).toBeLessThanOrEqual(gridSse + tolerance(gridSse, scale));
  const onGrid = isOnGrid(exact.heatingChangepoint, gridPerDegree) && isOnGrid(exact.coolingChangepoint, gridPerDegree);
  if (onGrid)
    expect(Math.abs(exact.sse - gridSse), `exact ${exact.sse} vs grid ${gridSse}`).toBeLessThanOrEqual(
      tolerance(gridSse, scale),
    );
  return { onGrid };
}

describe('searchChangepoints is exact: never above a fine grid (reference: test/support/grid-search.ts)', () => {
  // Temperatures with one decimal and a 0.05° grid: every data point is a grid value.
  for (const shape of ['3PC', '3PH', '4P'] as const) {
    it(`${shape}: exact SSE ≤ grid SSE (0.05° grid), equal where the exact changepoint is a grid value`, () => {
      let matchedOnGrid = 0;
      fc.assert(
        fc.property(datasetArbitrary(shape, 10, 100), (data) => {
          if (checkAgainstGrid(shape, data, 20).onGrid) matchedOnGrid++;
        }),
        { numRuns: 120, seed: 1966 },
      );
      // The generator puts changepoints on data points often enough that the equality branch runs.
      expect(matchedOnGrid).toBeGreaterThan(5);
    });
  }

  it('5P: exact SSE ≤ grid SSE on a 0.5° grid (half-degree data), equal where the exact changepoints are grid values', () => {
    let matchedOnGrid = 0;
    fc.assert(
      fc.property(datasetArbitrary('5P', 2, 40), (data) => {
        if (checkAgainstGrid('5P', data, 2).onGrid) matchedOnGrid++;
      }),
      { numRuns: 100, seed: 1129 },
    );
    expect(matchedOnGrid).toBeGreaterThan(2);
  });
});

describe('searchChangepoints reports the SSE of its own changepoints', () => {
  for (const shape of ['3PC', '3PH', '4P', '5P'] as const) {
    it(`${shape}: returned SSE = weighted least squares refitted at the returned changepoints (1e-8 relative)`, () => {
      fc.assert(
        fc.property(datasetArbitrary(shape, 10, 100), (data) => {
          const exact = exactOptimum(shape, data.x, data.y, data.w, data.minPoints);
          if (exact === null) return;
          const refit = refitSse(shape, exact, data.x, data.y, data.w);
          const sst = dataScale(data.y, data.w);
          // 1e-8 relative; the SST floor again only for SSE ≈ 0 (noiseless cases).
          expect(Math.abs(refit - exact.sse)).toBeLessThanOrEqual(1e-8 * refit + 1e-12 * sst);
        }),
        { numRuns: 150, seed: 2000 + shape.length },
      );
    });
  }
});

interface Truth {
  heating: number | null;
  cooling: number | null;
}

/**
 * Noiseless data from a known hinge: `perRegion` distinct temperatures
 * strictly inside each region (below cH, between, above cC), so the hinge is
 * the only zero-SSE fit.
 */
function noiselessArbitrary(
  shape: HingeShape,
): fc.Arbitrary<{ x: number[]; y: number[]; w: number[]; truth: Truth; minPoints: number }> {
  return fc
    .record({
      c1: fc.integer({ min: 200, max: 500 }),
      gap: fc.integer({ min: 30, max: 300 }),
      perRegion: fc.integer({ min: 4, max: 9 }),
      minPoints: fc.integer({ min: 1, max: 3 }),
      rateH: fc.integer({ min: 1, max: 40 }),
      rateC: fc.integer({ min: 1, max: 40 }),
      base: fc.integer({ min: 50, max: 800 }),
      seed: fc.integer({ min: 0, max: 2 ** 31 - 1 }),
    })
    .map(({ c1, gap, perRegion, minPoints, rateH, rateC, base, seed }) => {
      const random = seededRandom(seed);
      const cH = shape === '3PC' ? null : c1 / 10;
      const cC = shape === '3PH' ? null : shape === '5P' ? (c1 + gap) / 10 : c1 / 10;
      const distinct = (from: number, to: number): number[] => {
        // `perRegion` distinct tenths strictly between from and to (in tenths).
        const values = new Set<number>();
        while (values.size < Math.min(perRegion, to - from - 1))
          values.add(from + 1 + random.integer(0, to - from - 2));
        return [...values].map((t) => t / 10);
      };
      const lowEdge = Math.max(0, c1 - 200);
      const x =
        shape === '5P'
          ? [...distinct(lowEdge, c1), ...distinct(c1, c1 + gap), ...distinct(c1 + gap, c1 + gap + 200)]
          : [...distinct(lowEdge, c1), ...distinct(c1, c1 + 200)];
      for (let i = x.length - 1; i > 0; i--) {
        const j = random.integer(0, i);
        [x[i], x[j]] = [x[j]!, x[i]!];
      }
      // 4P needs a bend: falling below (heating) and rising above (cooling) is the physical case.
      const y = x.map(
        (v) => base + (cH === null ? 0 : rateH * Math.max(cH - v, 0)) + (cC === null ? 0 : rateC * Math.max(v - cC, 0)),
      );
      const w = x.map(() => random.integer(1, 31));
      return { x, y, w, truth: { heating: cH, cooling: cC }, minPoints };
    });
}

describe('noiseless data from a known shape give back its changepoints (synthetic: the test sets the truth)', () => {
  for (const shape of ['3PC', '3PH', '4P', '5P'] as const) {
    it(`${shape}: changepoints recovered to 1e-6, SSE ≈ 0`, () => {
      fc.assert(
        fc.property(noiselessArbitrary(shape), ({ x, y, w, truth, minPoints }) => {
          const exact = exactOptimum(shape, x, y, w, minPoints);
          expect(exact).not.toBeNull();
          if (truth.heating !== null) expect(Math.abs(exact!.heatingChangepoint! - truth.heating)).toBeLessThan(1e-6);
          else expect(exact!.heatingChangepoint).toBeNull();
          if (truth.cooling !== null) expect(Math.abs(exact!.coolingChangepoint! - truth.cooling)).toBeLessThan(1e-6);
          else expect(exact!.coolingChangepoint).toBeNull();
          expect(exact!.sse).toBeLessThanOrEqual(1e-12 * dataScale(y, w)); // rounding floor only
        }),
        { numRuns: 80, seed: 55 + shape.length },
      );
    });
  }

  it('a hand-made 5P (heating below 50, cooling above 70) is recovered', () => {
    // synthetic: the test sets the truth — y = 100 + 4·(50 − x)₊ + 6·(x − 70)₊
    const x = [20, 27.5, 35, 42, 48, 52, 57, 61, 66, 69, 73, 78, 84, 90];
    const y = x.map((v) => 100 + 4 * Math.max(50 - v, 0) + 6 * Math.max(v - 70, 0));
    const w = x.map((_, i) => 28 + (i % 4));
    const exact = exactOptimum('5P', x, y, w, 3)!;
    expect(exact.heatingChangepoint!).toBeCloseTo(50, 6);
    expect(exact.coolingChangepoint!).toBeCloseTo(70, 6);
    expect(exact.sse).toBeLessThan(1e-6);
  });
});

describe('feasibility: every segment keeps minPoints points, a point on a changepoint counting in both', () => {
  const line = (n: number) => {
    const x = Array.from({ length: n }, (_, i) => 40 + 3 * i);
    return { x, y: x.map((v) => 200 + 5 * Math.max(v - 50, 0)), w: x.map(() => 30) };
  };

  it('n ≤ 2·minPoints − 2 leaves no placement for any shape → null (hand-worked)', () => {
    for (const minPoints of [2, 3, 4, 6]) {
      const { x, y, w } = line(2 * minPoints - 2);
      for (const shape of ['3PC', '3PH', '4P', '5P'] as const) {
        expect(exactOptimum(shape, x, y, w, minPoints), `${shape}, minPoints ${minPoints}`).toBeNull();
      }
    }
  });

  it('n = 2·minPoints − 1 is feasible only with the changepoint on the middle point, shared by both segments (hand-worked)', () => {
    // 5 points, minPoints 3: x3 = 46 is the only changepoint with 3 points at or below and 3 at or above.
    const { x, y, w } = line(5);
    for (const shape of ['3PC', '3PH', '4P'] as const) {
      const exact = exactOptimum(shape, x, y, w, 3);
      expect(exact, shape).not.toBeNull();
      expect(exact!.heatingChangepoint ?? exact!.coolingChangepoint).toBeCloseTo(46, 9);
    }
    // The 5P middle band would need 3 points in [cH, cC] as well: impossible with 5 points.
    expect(exactOptimum('5P', x, y, w, 3)).toBeNull();
  });

  it('5P needs 3·minPoints − 2 points (two shared); one fewer is infeasible (hand-worked)', () => {
    const seven = line(7);
    expect(exactOptimum('5P', seven.x, seven.y, seven.w, 3)).not.toBeNull();
    const six = line(6);
    expect(exactOptimum('5P', six.x, six.y, six.w, 3)).toBeNull();
  });

  it('on a wide data set the returned changepoints leave ≥ minPoints in every segment', () => {
    const random = seededRandom(7);
    const x = Array.from({ length: 30 }, () => Math.round(random.uniform() * 800) / 10 + 10);
    const y = x.map(() => 100 + 10 * random.normal()); // pure noise: the optimum is pushed to the edges
    const w = x.map(() => random.integer(1, 31));
    for (const minPoints of [1, 4, 8]) {
      for (const shape of ['3PC', '3PH', '4P', '5P'] as const) {
        const exact = exactOptimum(shape, x, y, w, minPoints)!;
        const low = exact.heatingChangepoint ?? exact.coolingChangepoint!;
        const high = exact.coolingChangepoint ?? exact.heatingChangepoint!;
        const eps = 1e-9; // the search works in centred units, so a changepoint on a point may be off by rounding
        expect(x.filter((v) => v <= low + eps).length, `${shape} k=${minPoints} lower`).toBeGreaterThanOrEqual(
          minPoints,
        );
        expect(x.filter((v) => v >= high - eps).length, `${shape} k=${minPoints} upper`).toBeGreaterThanOrEqual(
          minPoints,
        );
        if (shape === '5P') {
          expect(x.filter((v) => v >= low - eps && v <= high + eps).length).toBeGreaterThanOrEqual(minPoints);
        }
      }
    }
  });
});
