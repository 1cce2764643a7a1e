import { readFileSync } from 'node:fs';
import { describe, it, expect } from 'vitest';
import { fCritical, twoSidedTCritical } from '../../../src/engine/stats/distributions.js';

/**
 * Quantiles against a published table and against scipy.stats (via
 * test/reference/make-wls-fixtures.py; see its header for versions).
 */
const fixture = JSON.parse(readFileSync(new URL('../../reference/wls-fixtures.json', import.meta.url), 'utf8')) as {
  tQuantiles: { confidence: number; dof: number; value: number }[];
  fQuantiles: { level: number; df1: number; df2: number; value: number }[];
};

function expectRelativelyClose(actual: number, expected: number, tolerance: number): void {
  expect(
    Math.abs(actual - expected) / Math.abs(expected),
    `actual ${actual}, expected ${expected}`,
  ).toBeLessThanOrEqual(tolerance);
}

// NIST/SEMATECH e-Handbook of Statistical Methods, section 1.3.6.7.2, "Critical
// values of the Student's t distribution" (upper-tail probabilities 0.10, 0.05,
// 0.025, i.e. two-sided 80%, 90%, 95%), three decimals.
const NIST_T_TABLE: { dof: number; two80: number; two90: number; two95: number }[] = [
  { dof: 1, two80: 3.078, two90: 6.314, two95: 12.706 }, // NIST/SEMATECH e-Handbook 1.3.6.7.2
  { dof: 5, two80: 1.476, two90: 2.015, two95: 2.571 }, // NIST/SEMATECH e-Handbook 1.3.6.7.2
  { dof: 10, two80: 1.372, two90: 1.812, two95: 2.228 }, // NIST/SEMATECH e-Handbook 1.3.6.7.2
  { dof: 20, two80: 1.325, two90: 1.725, two95: 2.086 }, // NIST/SEMATECH e-Handbook 1.3.6.7.2
  { dof: 30, two80: 1.31, two90: 1.697, two95: 2.042 }, // NIST/SEMATECH e-Handbook 1.3.6.7.2
  { dof: 60, two80: 1.296, two90: 1.671, two95: 2.0 }, // NIST/SEMATECH e-Handbook 1.3.6.7.2
  { dof: 100, two80: 1.29, two90: 1.66, two95: 1.984 }, // NIST/SEMATECH e-Handbook 1.3.6.7.2
];

describe('twoSidedTCritical against a published table', () => {
  for (const row of NIST_T_TABLE) {
    it(`dof = ${row.dof}`, () => {
      // Table is rounded to 3 decimals: agree within half a unit in the last place.
      expect(Math.abs(twoSidedTCritical(0.8, row.dof) - row.two80)).toBeLessThanOrEqual(0.0005);
      expect(Math.abs(twoSidedTCritical(0.9, row.dof) - row.two90)).toBeLessThanOrEqual(0.0005);
      expect(Math.abs(twoSidedTCritical(0.95, row.dof) - row.two95)).toBeLessThanOrEqual(0.0005);
    });
  }

  it('large dof approaches the table’s ∞ row (normal quantiles 1.282, 1.645, 1.960)', () => {
    // ∞ row: NIST/SEMATECH e-Handbook 1.3.6.7.2. At dof = 1000 the t quantile sits just above it:
    // 1.2824, 1.6464, 1.9623 (scipy fixture), so compare within 0.003.
    expect(Math.abs(twoSidedTCritical(0.8, 1000) - 1.282)).toBeLessThanOrEqual(0.003);
    expect(Math.abs(twoSidedTCritical(0.9, 1000) - 1.645)).toBeLessThanOrEqual(0.003);
    expect(Math.abs(twoSidedTCritical(0.95, 1000) - 1.96)).toBeLessThanOrEqual(0.003);
  });
});

describe('twoSidedTCritical against scipy.stats.t.ppf (reference library: test/reference/make-wls-fixtures.py)', () => {
  it('covers 68/80/90/95% over the fixture dof range', () => {
    expect(fixture.tQuantiles.length).toBeGreaterThanOrEqual(4 * 10);
  });
  for (const q of fixture.tQuantiles) {
    it(`confidence ${q.confidence}, dof ${q.dof}`, () => {
      expectRelativelyClose(twoSidedTCritical(q.confidence, q.dof), q.value, 1e-6); // scipy t.ppf((1+c)/2, dof), fixture script
    });
  }

  it('rejects confidences outside (0, 1) and returns ∞ for no degrees of freedom', () => {
    expect(() => twoSidedTCritical(1, 10)).toThrow(RangeError);
    expect(() => twoSidedTCritical(0, 10)).toThrow(RangeError);
    expect(twoSidedTCritical(0.9, 0)).toBe(Number.POSITIVE_INFINITY);
  });
});

describe('fCritical against scipy.stats.f.ppf (reference library: test/reference/make-wls-fixtures.py)', () => {
  for (const q of fixture.fQuantiles) {
    it(`level ${q.level}, df ${q.df1}, ${q.df2}`, () => {
      expectRelativelyClose(fCritical(q.level, q.df1, q.df2), q.value, 1e-6); // scipy f.ppf(1 − level, df1, df2), fixture script
    });
  }
});
