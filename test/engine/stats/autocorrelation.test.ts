/**
 * Lag-1 autocorrelation and Durbin–Watson (src/engine/stats/autocorrelation.ts).
 * Check values: short series worked by hand from the definitions
 * ρ = Σ eₜeₜ₋₁ / Σ eₜ² and DW = Σ(eₜ − eₜ₋₁)² / Σ eₜ² (source: common
 * practice; arithmetic by hand), and a long synthetic AR(1) series whose
 * true ρ the test sets.
 */
import { describe, expect, it } from 'vitest';
import { durbinWatson, lagOneAutocorrelation } from '../../../src/engine/stats/autocorrelation.js';
import { ar1Series, seededRandom } from '../../support/synthetic.js';

describe('lagOneAutocorrelation and durbinWatson', () => {
  it('match hand-worked series', () => {
    expect(lagOneAutocorrelation([1, 2, 3])).toBeCloseTo(8 / 14, 12); // (1·2 + 2·3)/(1 + 4 + 9) (by hand)
    expect(durbinWatson([1, 2, 3])).toBeCloseTo(2 / 14, 12); // (1 + 1)/14 (by hand)
    expect(lagOneAutocorrelation([1, -1, 1, -1])).toBe(-0.75); // −3/4 (by hand)
    expect(durbinWatson([1, -1, 1, -1])).toBe(3); // 12/4 (by hand)
  });

  it('answer NaN for fewer than two values or all-zero residuals', () => {
    for (const residuals of [[], [1], [0, 0, 0]]) {
      expect(lagOneAutocorrelation(residuals)).toBeNaN();
      expect(durbinWatson(residuals)).toBeNaN();
    }
  });

  it('recover the ρ of a long AR(1) series, with DW near 2(1 − ρ)', () => {
    const rho = 0.6; // the truth this synthetic series is built with
    const series = ar1Series(20_000, 1, rho, seededRandom(11));
    const estimate = lagOneAutocorrelation(series);
    expect(estimate).toBeGreaterThan(rho - 0.03); // standard error √((1 − ρ²)/n) ≈ 0.006 (common practice), so 0.03 is 5 of them
    expect(estimate).toBeLessThan(rho + 0.03);
    expect(durbinWatson(series)).toBeCloseTo(2 * (1 - estimate), 2); // DW ≈ 2(1 − ρ̂) for long series (common practice)
  });
});
