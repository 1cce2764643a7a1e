import { describe, it, expect } from 'vitest';
import { fitShape, type ShapeFit, type ShapeFitResult } from '../../../src/engine/fit/fit-shape.js';
import { MODEL_NAMES, type ModelName } from '../../../src/engine/types.js';
import { hinge, periodsFromPoints, seededRandom } from '../../support/synthetic.js';

function fitted(result: ShapeFitResult): ShapeFit {
  if (!result.ok) throw new Error(`fit failed: ${result.reason}`);
  return result;
}

/** 40 monthly-like points spanning heating, flat and cooling regions (synthetic: the test sets the truth). */
function fullRangePoints(seed: number, noise: number) {
  const random = seededRandom(seed);
  const truth = { base: 250, heatingBelow: 52, heatingRate: 6, coolingAbove: 70, coolingRate: 9 };
  return Array.from({ length: 40 }, (_, i) => {
    const temp = Math.round((20 + (75 * i) / 39) * 10) / 10;
    return { temp, usePerDay: hinge(temp, truth) + noise * random.normal(), days: 28 + (i % 4) };
  });
}

describe('coefficients are reported as dy/dx (use per day per degree)', () => {
  it('3PH: a heating slope of 8 per degree colder is reported as −8; the raw hinge coefficient is +8', () => {
    // synthetic: the test sets the truth — y = 300 + 8·(55 − x)₊
    const points = [20, 28, 35, 41, 47, 52, 58, 63, 69, 75].map((temp) => ({
      temp,
      usePerDay: 300 + 8 * Math.max(55 - temp, 0),
      days: 30,
    }));
    const fit = fitted(fitShape(periodsFromPoints(points), '3PH', 3));
    expect(fit.parameters.heatingSlope).toBeCloseTo(-8, 9);
    expect(fit.rawCoefficients[1]).toBeCloseTo(8, 9);
    expect(fit.parameters.heatingChangepoint).toBeCloseTo(55, 9);
    expect(fit.parameters.base).toBeCloseTo(300, 9);
  });

  it('5P: heating slope negative, cooling slope positive; 4P: slopeBelow and slopeAbove both as dy/dx', () => {
    // synthetic: the test sets the truth — 250 + 6·(52 − x)₊ + 9·(x − 70)₊
    const periods = periodsFromPoints(fullRangePoints(1, 0));
    const five = fitted(fitShape(periods, '5P', 3));
    expect(five.parameters.heatingSlope).toBeCloseTo(-6, 8);
    expect(five.parameters.coolingSlope).toBeCloseTo(9, 8);
    expect(five.parameters.heatingChangepoint).toBeCloseTo(52, 8);
    expect(five.parameters.coolingChangepoint).toBeCloseTo(70, 8);
    expect(five.coefficients.map((c) => c.name)).toEqual(['base', 'heatingSlope', 'coolingSlope']);
    // t-statistics carry the same sign as the reported slope.
    expect(Math.sign(five.coefficients[1]!.tStat)).toBe(-1);
    expect(Math.sign(five.coefficients[2]!.tStat)).toBe(1);

    // synthetic: a V with its bottom at 60: 200 + 5·(60 − x)₊ + 7·(x − 60)₊
    const vee = [30, 36, 42, 48, 54, 58, 62, 66, 72, 78, 84, 90].map((temp) => ({
      temp,
      usePerDay: 200 + 5 * Math.max(60 - temp, 0) + 7 * Math.max(temp - 60, 0),
      days: 30,
    }));
    const four = fitted(fitShape(periodsFromPoints(vee), '4P', 3));
    expect(four.parameters.slopeBelow).toBeCloseTo(-5, 8);
    expect(four.parameters.slopeAbove).toBeCloseTo(7, 8);
    expect(four.parameters.changepoint).toBeCloseTo(60, 8);
  });
});

describe('what every shape reports', () => {
  const periods = periodsFromPoints(fullRangePoints(2, 6));
  const expectedKeys: Record<ModelName, string[]> = {
    // The shape model's own naming (src/engine/fit/shape-model.ts): linear coefficients, then changepoints.
    '1P': ['base'],
    '2P': ['intercept', 'slope'],
    '3PC': ['base', 'coolingSlope', 'coolingChangepoint'],
    '3PH': ['base', 'heatingSlope', 'heatingChangepoint'],
    '4P': ['base', 'slopeBelow', 'slopeAbove', 'changepoint'],
    '5P': ['base', 'heatingSlope', 'coolingSlope', 'heatingChangepoint', 'coolingChangepoint'],
  };
  const expectedSegments: Record<ModelName, string[]> = {
    '1P': ['all'],
    '2P': ['all'],
    '3PC': ['flat', 'cooling'],
    '3PH': ['heating', 'flat'],
    '4P': ['below', 'above'],
    '5P': ['heating', 'flat', 'cooling'],
  };

  for (const model of MODEL_NAMES) {
    it(`${model}: parameter names, segment names, n, p and temperature range`, () => {
      const fit = fitted(fitShape(periods, model, 3));
      expect(Object.keys(fit.parameters)).toEqual(expectedKeys[model]);
      expect(Object.keys(fit.segmentCounts)).toEqual(expectedSegments[model]);
      expect(fit.n).toBe(40);
      expect(fit.p).toBe({ '1P': 1, '2P': 2, '3PC': 3, '3PH': 3, '4P': 4, '5P': 5 }[model]); // Guideline 14 parameter counts (brief)
      expect(fit.temperatureRange).toEqual({ min: 20, max: 95 }); // synthetic: temperatures run 20 … 95
      expect(fit.residuals).toHaveLength(40);
      for (const c of fit.changepointEstimates) {
        expect(c.estimate).toBeGreaterThanOrEqual(20);
        expect(c.estimate).toBeLessThanOrEqual(95);
      }
    });
  }

  it('segment counts: a point on the changepoint counts in both segments (hand-worked)', () => {
    // 3PC through (60, 100) with 5 per degree above; 60 is a data point. Noiseless, so the
    // changepoint lands on 60 (to rounding) and 60 belongs to both segments.
    const temps = [30, 40, 50, 60, 70, 80, 90];
    const points = temps.map((temp) => ({ temp, usePerDay: 100 + 5 * Math.max(temp - 60, 0), days: 30 }));
    const fit = fitted(fitShape(periodsFromPoints(points), '3PC', 2));
    expect(fit.changepoints.cooling).toBeCloseTo(60, 9);
    const c = fit.changepoints.cooling!;
    // Whatever side of 60 rounding puts c on, the two counts cover all 7 points, sharing at most one.
    expect(fit.segmentCounts.flat! + fit.segmentCounts.cooling!).toBeGreaterThanOrEqual(7);
    expect(fit.segmentCounts.flat).toBe(temps.filter((t) => t <= c).length);
    expect(fit.segmentCounts.cooling).toBe(temps.filter((t) => t >= c).length);
  });

  it('segment counts of a 5P fit with changepoints inside gaps (hand-worked)', () => {
    // synthetic: 100 + 4·(49 − x)₊ + 6·(x − 71)₊: changepoints 49 and 71 fall between data points.
    const temps = [30, 35, 40, 45, 50, 55, 60, 65, 70, 75, 80, 85];
    const points = temps.map((temp) => ({
      temp,
      usePerDay: 100 + 4 * Math.max(49 - temp, 0) + 6 * Math.max(temp - 71, 0),
      days: 30,
    }));
    const fit = fitted(fitShape(periodsFromPoints(points), '5P', 3));
    expect(fit.changepoints.heating).toBeCloseTo(49, 8);
    expect(fit.changepoints.cooling).toBeCloseTo(71, 8);
    // ≤ 49: 30…45 (4); in [49, 71]: 50…70 (5); ≥ 71: 75…85 (3)
    expect(fit.segmentCounts).toEqual({ heating: 4, flat: 5, cooling: 3 });
  });

  it('fails with a stated reason when n ≤ p or the temperatures do not spread', () => {
    const three = periodsFromPoints([40, 50, 60].map((temp) => ({ temp, usePerDay: 100, days: 30 })));
    const result = fitShape(three, '3PC', 1);
    expect(result.ok).toBe(false);
    if (!result.ok) expect(result.reason).toBe('needs more than 3 periods, has 3');

    const flatTemps = periodsFromPoints(
      [50, 50, 50, 50, 50].map((temp, i) => ({ temp, usePerDay: 100 + i, days: 30 })),
    );
    const line = fitShape(flatTemps, '2P', 1);
    expect(line.ok).toBe(false);
    if (!line.ok) expect(line.reason).toMatch(/singular/);

    const few = periodsFromPoints([40, 45, 50, 55, 60, 65].map((temp) => ({ temp, usePerDay: 100, days: 30 })));
    const hingeFit = fitShape(few, '3PC', 4);
    expect(hingeFit.ok).toBe(false);
    if (!hingeFit.ok) expect(hingeFit.reason).toBe('no changepoint leaves 4 points in every segment');
  });
});

describe('Guideline 14 statistics on hand-worked examples', () => {
  it('1P on four bills', () => {
    // Hand-worked. days 30, 31, 28, 31 (120); quantities 600, 620, 588, 592 (2400).
    // 1P: ŷ = 2400/120 = 20 per day. Energy residuals e = q − d·ŷ = 0, 0, 28, −28.
    // n = 4, p = 1: RMSE = sqrt(1568/3) = 22.86190…; Ē = 600; CV(RMSE) = 0.0381032…;
    // NMBE = Σe/((n−p)Ē) = 0. R² = 0 (the mean explains nothing); adjusted R² = 1 − 1·3/3 = 0.
    // ρ = (0·0 + 0·28 + 28·(−28))/1568 = −0.5; DW = (0² + 28² + 56²)/1568 = 3920/1568 = 2.5.
    const periods = periodsFromPoints([
      { temp: 40, usePerDay: 600 / 30, days: 30 },
      { temp: 50, usePerDay: 620 / 31, days: 31 },
      { temp: 60, usePerDay: 588 / 28, days: 28 },
      { temp: 70, usePerDay: 592 / 31, days: 31 },
    ]);
    const fit = fitted(fitShape(periods, '1P', 3));
    expect(fit.parameters.base).toBeCloseTo(20, 12);
    fit.residuals.forEach((e, i) => expect(e).toBeCloseTo([0, 0, 28, -28][i]!, 9));
    expect(fit.stats.rmse).toBeCloseTo(Math.sqrt(1568 / 3), 9);
    expect(fit.stats.rmse).toBeCloseTo(22.8619042, 6);
    expect(fit.stats.cvrmse).toBeCloseTo(0.0381031737, 9);
    expect(fit.stats.nmbe).toBeCloseTo(0, 12);
    expect(fit.stats.r2).toBeCloseTo(0, 12);
    expect(fit.stats.adjustedR2).toBeCloseTo(0, 12);
    expect(fit.stats.autocorrelation).toBeCloseTo(-0.5, 12);
    expect(fit.stats.durbinWatson).toBeCloseTo(2.5, 12);
  });

  it('2P on four one-day readings, given out of time order (statistics follow time order)', () => {
    // Hand-worked. In time order x = 0, 1, 2, 3 and y = 1, 3, 2, 4, one day each.
    // x̄ = 1.5, ȳ = 2.5, Sxx = 5, Sxy = 4 → slope 0.8, intercept 1.3.
    // Fitted 1.3, 2.1, 2.9, 3.7; residuals −0.3, 0.9, −0.9, 0.3; SSE = 1.8; n − p = 2.
    // RMSE = sqrt(0.9) = 0.9486833; CV(RMSE) = 0.9486833/2.5 = 0.3794733; NMBE = 0.
    // SST = 5 → R² = 0.64; adjusted R² = 1 − 0.36·3/2 = 0.46.
    // SE(slope) = sqrt(0.9/5) = 0.4242641; t = 0.8/0.4242641 = 1.8856181.
    // ρ = (−0.27 − 0.81 − 0.27)/1.8 = −0.75; DW = (1.44 + 3.24 + 1.44)/1.8 = 3.4.
    const inTimeOrder = periodsFromPoints([
      { temp: 0, usePerDay: 1, days: 1 },
      { temp: 1, usePerDay: 3, days: 1 },
      { temp: 2, usePerDay: 2, days: 1 },
      { temp: 3, usePerDay: 4, days: 1 },
    ]);
    const shuffled = [inTimeOrder[2]!, inTimeOrder[0]!, inTimeOrder[3]!, inTimeOrder[1]!];
    const fit = fitted(fitShape(shuffled, '2P', 3));
    expect(fit.parameters.intercept).toBeCloseTo(1.3, 12);
    expect(fit.parameters.slope).toBeCloseTo(0.8, 12);
    fit.residuals.forEach((e, i) => expect(e).toBeCloseTo([-0.3, 0.9, -0.9, 0.3][i]!, 12));
    expect(fit.sse).toBeCloseTo(1.8, 12);
    expect(fit.stats.rmse).toBeCloseTo(0.9486833, 7);
    expect(fit.stats.cvrmse).toBeCloseTo(0.3794733, 7);
    expect(fit.stats.nmbe).toBeCloseTo(0, 12);
    expect(fit.stats.r2).toBeCloseTo(0.64, 12);
    expect(fit.stats.adjustedR2).toBeCloseTo(0.46, 12);
    expect(fit.coefficients[1]!.standardError).toBeCloseTo(0.4242641, 7);
    expect(fit.coefficients[1]!.tStat).toBeCloseTo(1.8856181, 7);
    expect(fit.stats.autocorrelation).toBeCloseTo(-0.75, 12);
    expect(fit.stats.durbinWatson).toBeCloseTo(3.4, 12);
  });

  it('positively autocorrelated residuals give ρ > 0 and DW < 2 (hand-worked)', () => {
    // A 1P on equal-day periods with use 10, 10, 10, 14, 14, 14 (mean 12): residuals
    // −2, −2, −2, 2, 2, 2 per day (days 1). ρ = (4 + 4 − 4 + 4 + 4)/24 = 0.5; DW = 16/24 = 0.666…
    const periods = periodsFromPoints(
      [10, 10, 10, 14, 14, 14].map((usePerDay, i) => ({ temp: 40 + i, usePerDay, days: 1 })),
    );
    const fit = fitted(fitShape(periods, '1P', 3));
    expect(fit.stats.autocorrelation).toBeCloseTo(0.5, 12);
    expect(fit.stats.durbinWatson).toBeCloseTo(2 / 3, 12);
  });
});

describe('changepoint standard errors (Gauss–Newton)', () => {
  it('are finite and positive on noisy data for every changepoint shape', () => {
    const periods = periodsFromPoints(fullRangePoints(3, 8));
    for (const model of ['3PC', '3PH', '4P', '5P'] as const) {
      const fit = fitted(fitShape(periods, model, 3));
      for (const c of fit.changepointEstimates) {
        expect(c.standardError, `${model} ${c.name}`).not.toBeNull();
        expect(Number.isFinite(c.standardError!)).toBe(true);
        expect(c.standardError!).toBeGreaterThan(0);
      }
    }
  });

  /**
   * Numeric check: refit many seeded re-simulations of one known shape and
   * compare the spread of the fitted changepoints with the median reported
   * standard error. The Gauss–Newton value is asymptotic, so agreement
   * within 30% is asked (synthetic: the test sets the truth; measured ratios
   * were 0.8–1.05 across seeds when this test was written).
   */
  const cases: { model: ModelName; truth: Parameters<typeof hinge>[1] }[] = [
    { model: '3PC', truth: { base: 200, coolingAbove: 65, coolingRate: 6 } },
    { model: '3PH', truth: { base: 200, heatingBelow: 55, heatingRate: 5 } },
    { model: '4P', truth: { base: 200, heatingBelow: 60, heatingRate: 5, coolingAbove: 60, coolingRate: 7 } },
    { model: '5P', truth: { base: 200, heatingBelow: 50, heatingRate: 5, coolingAbove: 70, coolingRate: 7 } },
  ];
  for (const { model, truth } of cases) {
    it(`${model}: reported standard error ≈ spread of changepoints over 250 re-simulations (within 30%)`, () => {
      const random = seededRandom(model.length * 1000 + 17);
      const temps = Array.from({ length: 36 }, (_, i) => Math.round((25 + (70 * i) / 35) * 10) / 10);
      const estimates: number[][] = [];
      const errors: number[][] = [];
      for (let run = 0; run < 250; run++) {
        const points = temps.map((temp) => ({ temp, usePerDay: hinge(temp, truth) + 8 * random.normal(), days: 30 }));
        const fit = fitted(fitShape(periodsFromPoints(points), model, 3));
        estimates.push(fit.changepointEstimates.map((c) => c.estimate));
        errors.push(fit.changepointEstimates.map((c) => c.standardError ?? Number.NaN));
      }
      const count = estimates[0]!.length;
      for (let j = 0; j < count; j++) {
        const values = estimates.map((e) => e[j]!);
        const mean = values.reduce((a, b) => a + b, 0) / values.length;
        const spread = Math.sqrt(values.reduce((a, b) => a + (b - mean) ** 2, 0) / (values.length - 1));
        const reported = errors.map((e) => e[j]!).sort((a, b) => a - b)[Math.floor(errors.length / 2)]!;
        expect(reported / spread, `${model} changepoint ${j}: SE ${reported}, spread ${spread}`).toBeGreaterThan(0.7);
        expect(reported / spread, `${model} changepoint ${j}: SE ${reported}, spread ${spread}`).toBeLessThan(1.3);
      }
    });
  }
});

describe('a changepoint on a data point keeps that point in its segment count', () => {
  /**
   * The search works in centred temperatures and adds the mean back, so a
   * changepoint placed exactly on the data point 15.9 comes back as
   * 15.899999999999999. countSegments then compares with ≤ / ≥ and drops the
   * point from the flat segment (2 instead of 3), and screening rejects the
   * shape for "too few points" although the search placed it legally
   * (3 points at or below 15.9: 11, 15, 15.9). Marked `fails` until the
   * engine returns the data value itself (or counts with a tolerance); the
   * lead should flip it to a plain `it` after the fix.
   */
  it('3PC on six points, minPoints 3: flat segment counts the point on the changepoint', () => {
    // found by random search (synthetic data); hand-checked counts above
    const temps = [84.3, 56.2, 15.9, 11, 50.8, 15];
    const uses = [104, 93, 104, 96, 90, 109];
    const fit = fitted(
      fitShape(periodsFromPoints(temps.map((temp, i) => ({ temp, usePerDay: uses[i]!, days: 30 }))), '3PC', 3),
    );
    expect(fit.changepoints.cooling).toBe(15.9);
    expect(fit.segmentCounts.flat).toBe(3);
  });
});
