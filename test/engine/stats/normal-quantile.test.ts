import { describe, expect, it } from 'vitest';
import { twoSidedNormalQuantile } from '../../../src/engine/stats/distributions.js';

describe('twoSidedNormalQuantile', () => {
  it('matches the reference library at every offered confidence', () => {
    // Reference library: Python's statistics.NormalDist.inv_cdf (test/reference/normal-quantiles.py).
    expect(twoSidedNormalQuantile(0.68)).toBeCloseTo(0.9944578832097535, 9);
    expect(twoSidedNormalQuantile(0.8)).toBeCloseTo(1.2815515655446008, 9);
    expect(twoSidedNormalQuantile(0.9)).toBeCloseTo(1.6448536269514715, 9);
    expect(twoSidedNormalQuantile(0.95)).toBeCloseTo(1.9599639845400536, 9);
  });

  it('refuses a confidence outside (0, 1)', () => {
    for (const bad of [0, 1, -0.5, 1.5, Number.NaN]) expect(() => twoSidedNormalQuantile(bad)).toThrow(RangeError);
  });
});
