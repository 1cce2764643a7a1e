import { describe, expect, it } from 'vitest';
import { searchedChangepointPValue } from '../../../src/engine/stats/davies-bound.js';
import { fPValue } from '../../../src/engine/stats/distributions.js';
import { billDaysForForm, hingeProfile } from '../../../src/engine/fit/day-resolved/profile.js';
import { bothSidesFeasible } from '../../../src/engine/fit/day-resolved/hinge-sweep.js';
import { periodsFromPoints, seededRandom } from '../../support/synthetic.js';

describe('searchedChangepointPValue (Davies 1987)', () => {
  it('the example in its doc comment: path 0 → 4 → 0 with σ known (df2 huge) gives P(χ²₁ > 4) + 4·e^(−2)/√(2π)', () => {
    // P(χ²₁ > 4) = 0.0455003 (χ² table); the second term is hand-worked.
    const expected = 0.0455003 + (4 * Math.exp(-2)) / Math.sqrt(2 * Math.PI);
    expect(searchedChangepointPValue({ path: [0, 4, 0], observed: 4, df2: 1e7 })).toBeCloseTo(expected, 5);
  });

  it('is never below the ordinary F tail and grows with the path’s variation', () => {
    const flat = searchedChangepointPValue({ path: [5, 5, 5], observed: 5, df2: 30 });
    const wiggly = searchedChangepointPValue({ path: [0, 5, 0, 5, 0], observed: 5, df2: 30 });
    expect(flat).toBeCloseTo(fPValue(5, 1, 30), 12);
    expect(wiggly).toBeGreaterThan(flat);
  });

  it('two numerator degrees of freedom: the tail of χ²₂ is e^(−u/2), the crossing term V·√u·e^(−u/2)/2 (hand-worked)', () => {
    // F = 3 with df2 huge is χ²₂ = 6: tail e^(−3); V = √6 − 0 along [0, 3] (√S scaled so the top is √6).
    const expected = Math.exp(-3) + (Math.sqrt(6) * Math.sqrt(6) * Math.exp(-3)) / 2;
    expect(searchedChangepointPValue({ path: [0, 3], observed: 3, df2: 1e7, df1: 2 })).toBeCloseTo(expected, 5);
  });

  it('holds its level where the changepoint does not exist: a searched 3PH on weather-free data (seeded simulation; the simulation sets the truth)', () => {
    // 24 periods at fixed temperatures from 20 to 80 °F, use = 100 + noise, no weather dependence.
    // The largest F over every 3PH placement against the mean model, 2,000 times.
    const random = seededRandom(20261202);
    const temps = Array.from({ length: 24 }, (_, i) => 20 + (60 * i) / 23);
    let rejectedBound = 0;
    let rejectedNaive = 0;
    const replicates = 2000;
    for (let r = 0; r < replicates; r++) {
      const periods = periodsFromPoints(
        temps.map((temp) => ({ temp, usePerDay: 100 + 10 * random.normal(), days: 30 })),
      );
      const days = billDaysForForm(periods, 'mean');
      const profile = hingeProfile(days, 'heating', null, bothSidesFeasible(days, 3));
      const df2 = 24 - 3;
      const path = profile.sse.map((sse) => Math.max(0, days.totalSquares - sse) / (sse / df2));
      const observed = Math.max(...path);
      if (searchedChangepointPValue({ path, observed, df2 }) <= 0.05) rejectedBound++;
      if (fPValue(observed, 1, df2) <= 0.05) rejectedNaive++;
    }
    // The plain F tail of the best placement fires far more often than 5%: the searched changepoint's problem.
    expect(rejectedNaive / replicates).toBeGreaterThan(0.1);
    // The bound holds the level (5% plus three Monte Carlo standard errors, √(0.05·0.95/2000) = 0.0049) without being useless.
    expect(rejectedBound / replicates).toBeLessThanOrEqual(0.05 + 3 * 0.0049);
    expect(rejectedBound / replicates).toBeGreaterThan(0.01);
  });
});
