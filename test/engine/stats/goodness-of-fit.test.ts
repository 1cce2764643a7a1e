/**
 * Goodness of fit by the ASHRAE Guideline 14 definitions (src/engine/stats/goodness-of-fit.ts).
 * Check values: a three-bill example worked by hand from the definitions in
 * the module's doc comments (source: ASHRAE Guideline 14 definitions, from
 * memory; the arithmetic by hand), and a property of least squares (common
 * practice: with an intercept the residuals sum to zero).
 */
import { describe, expect, it } from 'vitest';
import { energyResiduals, goodnessOfFit } from '../../../src/engine/stats/goodness-of-fit.js';
import { weightedLeastSquares } from '../../../src/engine/fit/wls.js';

// Three bills of 30, 31 and 30 days using 1, 2 and 3 per day; the model says 1.1, 1.9 and 3.0 per day; p = 2.
const BILLS = { quantity: [30, 62, 90], days: [30, 31, 30], fittedPerDay: [1.1, 1.9, 3.0], p: 2 };

describe('goodnessOfFit', () => {
  it('computes each statistic of a hand-worked example', () => {
    expect(energyResiduals(BILLS)).toEqual([-3, expect.closeTo(3.1, 12), 0]); // 30 − 33, 62 − 58.9, 90 − 90 (by hand)
    const fit = goodnessOfFit(BILLS);
    expect(fit.rmse).toBeCloseTo(Math.sqrt(18.61), 12); // √((9 + 9.61 + 0)/(3 − 2)) (by hand)
    expect(fit.cvrmse).toBeCloseTo(Math.sqrt(18.61) / (182 / 3), 12); // RMSE over the mean bill 182/3 (by hand)
    expect(fit.nmbe).toBeCloseTo(0.1 / (182 / 3), 12); // Σe = 0.1 over (n − p)·Ē (by hand)
    expect(fit.r2).toBeCloseTo(1 - 0.61 / 60, 12); // weighted SSE 30·0.01 + 31·0.01 over SST 30 + 0 + 30 about 2 per day (by hand)
    expect(fit.adjustedR2).toBeCloseTo(1 - ((0.61 / 60) * 2) / 1, 12); // 1 − (1 − R²)(n − 1)/(n − p) (by hand)
  });

  it('answers NaN where a statistic is undefined: no degrees of freedom, no spread', () => {
    const exact = goodnessOfFit({ quantity: [1, 2], days: [1, 1], fittedPerDay: [1, 2], p: 2 });
    expect(exact.rmse).toBeNaN(); // n − p = 0 (the definition divides by it)
    expect(exact.nmbe).toBeNaN();
    expect(goodnessOfFit({ quantity: [2, 2, 2], days: [1, 1, 1], fittedPerDay: [2, 2, 2], p: 1 }).r2).toBeNaN(); // SST = 0
  });

  it('gives an in-sample NMBE of zero for a least-squares line with an intercept', () => {
    // Synthetic bills whose truth the test sets: a line in temperature plus fixed deviations.
    const temps = [20, 30, 40, 50, 60, 70];
    const days = [31, 28, 31, 30, 31, 30];
    const perDay = temps.map((t, i) => 50 - 0.5 * t + [1, -2, 0.5, 1.5, -1, 0][i]!);
    const wls = weightedLeastSquares(
      temps.map((t) => [1, t]),
      perDay,
      days,
    )!;
    const fit = goodnessOfFit({ quantity: perDay.map((y, i) => y * days[i]!), days, fittedPerDay: wls.fitted, p: 2 });
    expect(fit.nmbe).toBeCloseTo(0, 12); // Σ wᵢ eᵢ = 0 with an intercept column (common practice)
    expect(fit.cvrmse).toBeGreaterThan(0);
  });
});
