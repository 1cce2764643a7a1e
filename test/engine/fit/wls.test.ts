import { readFileSync } from 'node:fs';
import { describe, it, expect } from 'vitest';
import { weightedLeastSquares } from '../../../src/engine/fit/wls.js';

/**
 * Cross-check of the least-squares core against a general-purpose reference
 * library. Every expected value in `wls-fixtures.json` comes from
 * test/reference/make-wls-fixtures.py (statsmodels WLS on invented,
 * fixed-seed data); see that script's header for versions and how to rerun.
 */
interface FixtureDataset {
  name: string;
  design: number[][];
  y: number[];
  weights: number[];
  dfResidOverride: number | null;
  params: number[];
  bse: number[];
  tvalues: number[];
  ssr: number;
  scale: number;
  dfResid: number;
  normalizedCovParams: number[][];
}

const fixture = JSON.parse(readFileSync(new URL('../../reference/wls-fixtures.json', import.meta.url), 'utf8')) as {
  datasets: FixtureDataset[];
};

function expectRelativelyClose(actual: number, expected: number, tolerance: number): void {
  const scale = Math.max(Math.abs(expected), Number.MIN_VALUE);
  expect(Math.abs(actual - expected) / scale, `actual ${actual}, expected ${expected}`).toBeLessThanOrEqual(tolerance);
}

function expectAllRelativelyClose(actual: readonly number[], expected: readonly number[], tolerance: number): void {
  expect(actual).toHaveLength(expected.length);
  expected.forEach((value, i) => expectRelativelyClose(actual[i]!, value, tolerance));
}

const TOLERANCE = 1e-9;

describe('weightedLeastSquares against statsmodels WLS (reference library: test/reference/make-wls-fixtures.py)', () => {
  it('fixture holds the expected datasets', () => {
    expect(fixture.datasets.map((d) => d.name)).toEqual([
      'monthly-hinge',
      'monthly-hinge-cp-dof',
      'monthly-line',
      'daily-hinge',
    ]);
  });

  for (const dataset of fixture.datasets) {
    describe(dataset.name, () => {
      const result = weightedLeastSquares(
        dataset.design,
        dataset.y,
        dataset.weights,
        dataset.dfResidOverride ?? undefined,
      );

      it('fits (design has full rank)', () => {
        expect(result).not.toBeNull();
      });

      it('coefficients match statsmodels params', () => {
        expectAllRelativelyClose(result!.coefficients, dataset.params, TOLERANCE); // statsmodels res.params (fixture script)
      });

      it('standard errors match statsmodels bse', () => {
        expectAllRelativelyClose(result!.standardErrors, dataset.bse, TOLERANCE); // statsmodels res.bse (fixture script)
      });

      it('t statistics match statsmodels tvalues', () => {
        expectAllRelativelyClose(result!.tStats, dataset.tvalues, TOLERANCE); // statsmodels res.tvalues (fixture script)
      });

      it('weighted SSE, residual df and residual variance match statsmodels ssr, df_resid and scale', () => {
        expectRelativelyClose(result!.sse, dataset.ssr, TOLERANCE); // statsmodels res.ssr (fixture script)
        expect(result!.degreesOfFreedom).toBe(dataset.dfResid); // statsmodels res.df_resid (fixture script)
        expectRelativelyClose(result!.residualVariance, dataset.scale, TOLERANCE); // statsmodels res.scale (fixture script)
      });

      it('unscaled covariance matches statsmodels normalized_cov_params', () => {
        const expected = dataset.normalizedCovParams; // statsmodels res.normalized_cov_params (fixture script)
        expect(result!.unscaledCovariance).toHaveLength(expected.length);
        expected.forEach((row, i) => expectAllRelativelyClose(result!.unscaledCovariance[i]!, row, TOLERANCE));
      });

      it('fitted values reproduce design × coefficients from statsmodels params', () => {
        const expected = dataset.design.map((row) => row.reduce((s, v, j) => s + v * dataset.params[j]!, 0)); // from statsmodels res.params (fixture script)
        expectAllRelativelyClose(result!.fitted, expected, TOLERANCE);
      });
    });
  }
});

describe('weightedLeastSquares on hand-worked and degenerate inputs', () => {
  it('three points on an exact line y = 2 + 3x give the line and zero residual', () => {
    // Hand-worked: (0, 2), (1, 5), (2, 8) lie on y = 2 + 3x, so β = (2, 3) and SSE = 0.
    const result = weightedLeastSquares(
      [
        [1, 0],
        [1, 1],
        [1, 2],
      ],
      [2, 5, 8],
      [1, 1, 1],
    );
    expect(result).not.toBeNull();
    expect(result!.coefficients[0]).toBeCloseTo(2, 12); // hand-worked
    expect(result!.coefficients[1]).toBeCloseTo(3, 12); // hand-worked
    expect(result!.sse).toBeCloseTo(0, 20); // hand-worked
    expect(result!.degreesOfFreedom).toBe(1); // hand-worked: n − k = 3 − 2
    expect(result!.fitted).toEqual([2, 5, 8].map((v) => expect.closeTo(v, 12))); // hand-worked
  });

  it('three points off a line: weighted fit, SSE, σ² and (XᵀWX)⁻¹ by hand', () => {
    // Hand-worked: x = 0, 1, 2; y = 1, 3, 4; weights 1.
    //   XᵀX = [[3, 3], [3, 5]], det = 6, (XᵀX)⁻¹ = [[5/6, −1/2], [−1/2, 1/2]]
    //   Xᵀy = [8, 11] → β = (5/6·8 − 1/2·11, −1/2·8 + 1/2·11) = (7/6, 3/2)
    //   fitted = 7/6, 8/3, 25/6; residuals = −1/6, 1/3, −1/6; SSE = 1/36 + 4/36 + 1/36 = 1/6
    //   df = 1, σ² = 1/6, se(β₁) = sqrt(1/6 · 1/2) = sqrt(1/12)
    const result = weightedLeastSquares(
      [
        [1, 0],
        [1, 1],
        [1, 2],
      ],
      [1, 3, 4],
      [1, 1, 1],
    )!;
    expect(result.coefficients[0]).toBeCloseTo(7 / 6, 12); // hand-worked
    expect(result.coefficients[1]).toBeCloseTo(3 / 2, 12); // hand-worked
    expect(result.sse).toBeCloseTo(1 / 6, 12); // hand-worked
    expect(result.residualVariance).toBeCloseTo(1 / 6, 12); // hand-worked
    expect(result.unscaledCovariance[0]![0]).toBeCloseTo(5 / 6, 12); // hand-worked
    expect(result.unscaledCovariance[0]![1]).toBeCloseTo(-1 / 2, 12); // hand-worked
    expect(result.unscaledCovariance[1]![1]).toBeCloseTo(1 / 2, 12); // hand-worked
    expect(result.standardErrors[1]).toBeCloseTo(Math.sqrt(1 / 12), 12); // hand-worked
  });

  it('integer weights act as repeated observations', () => {
    // Hand-worked: weight 2 on (1, 3) equals listing it twice; x = 0, 1, 1, 2 gives
    // XᵀX = [[4, 4], [4, 6]], Xᵀy = [11, 14], det = 8 → β = ((6·11 − 4·14)/8, (4·14 − 4·11)/8) = (5/4, 3/2).
    const result = weightedLeastSquares(
      [
        [1, 0],
        [1, 1],
        [1, 2],
      ],
      [1, 3, 4],
      [1, 2, 1],
    )!;
    expect(result.coefficients[0]).toBeCloseTo(5 / 4, 12); // hand-worked
    expect(result.coefficients[1]).toBeCloseTo(3 / 2, 12); // hand-worked
  });

  it('a rank-deficient design (duplicated column) returns null', () => {
    const design = [0, 1, 2, 3, 4].map((x) => [1, x, x]);
    expect(weightedLeastSquares(design, [1, 2, 3, 4, 6], [1, 1, 1, 1, 1])).toBeNull();
  });

  it('a rank-deficient design (cooling column all zero: no baseline period above the balance point) returns null', () => {
    const temps = [30, 35, 40, 45, 50, 60];
    const design = temps.map((x) => [1, Math.max(55 - x, 0), Math.max(x - 68, 0)]);
    expect(weightedLeastSquares(design, [9, 8, 7, 6, 5, 4], [31, 28, 31, 30, 31, 30])).toBeNull();
  });

  it('mismatched lengths and empty designs return null', () => {
    expect(weightedLeastSquares([], [], [])).toBeNull();
    expect(
      weightedLeastSquares(
        [
          [1, 0],
          [1, 1],
        ],
        [1, 2, 3],
        [1, 1, 1],
      ),
    ).toBeNull();
    expect(
      weightedLeastSquares(
        [
          [1, 0],
          [1, 1],
        ],
        [1, 2],
        [1],
      ),
    ).toBeNull();
  });
});
