import { describe, it, expect } from 'vitest';
import { computeSavings, CONFIDENCE_LEVELS } from '../../src/engine/savings.js';
import { fitShape, type ShapeFit } from '../../src/engine/fit/fit-shape.js';
import { predictPerDay } from '../../src/engine/fit/shape-model.js';
import { analyseBaseline, analyseSavings } from '../../src/engine/index.js';
import type { Period } from '../../src/engine/types.js';
import {
  CLIMATES,
  SAMPLE_BUILDING,
  dailyWeather,
  hinge,
  monthlyReadings,
  periodsFromPoints,
  seededRandom,
} from '../support/synthetic.js';

function fitted(periods: Period[], model: '3PC' | '2P' = '3PC'): ShapeFit {
  const result = fitShape(periods, model, 3);
  if (!result.ok) throw new Error(result.reason);
  return result;
}

const COOLING = { base: 100, coolingAbove: 65, coolingRate: 5 };

/** A noiseless 3PC baseline: 100 per day, +5 per degree above 65, temperatures 40 … 90 (synthetic). */
function exactBaseline(): ShapeFit {
  const temps = [40, 45, 50, 55, 60, 65, 70, 75, 80, 85, 90];
  return fitted(periodsFromPoints(temps.map((temp) => ({ temp, usePerDay: hinge(temp, COOLING), days: 30 }))));
}

/** A noisy 3PC baseline of 36 monthly-like periods from 40 to 90 °F (synthetic: the test sets the truth). */
function noisyBaseline(noise: number, seed = 3): ShapeFit {
  const random = seededRandom(seed);
  const points = Array.from({ length: 36 }, (_, i) => {
    const temp = Math.round((40 + (50 * i) / 35) * 10) / 10;
    return { temp, usePerDay: hinge(temp, COOLING) + noise * random.normal(), days: 30 };
  });
  return fitted(periodsFromPoints(points, '2029-01-01'));
}

/** Twelve reporting periods inside the baseline range that use `fraction` less than the true model. */
function reportingYear(fraction: number): Period[] {
  const temps = [45, 48, 55, 62, 70, 78, 85, 84, 76, 66, 56, 47];
  return periodsFromPoints(
    temps.map((temp) => ({ temp, usePerDay: (1 - fraction) * hinge(temp, COOLING), days: 30 })),
    '2033-01-01',
  );
}

describe('adjusted baseline and avoided energy (hand-worked with a 3PC)', () => {
  // Baseline: y = 100 + 5·(x − 65)₊ per day, fitted exactly; its temperatures run 40 … 90.
  // Reporting periods (days, mean temp → adjusted baseline = days × f(temp); actual; savings):
  //   31 d, 75 °F → 31 × 150 = 4650; 4000; 650
  //   30 d, 60 °F → 30 × 100 = 3000; 2900; 100
  //   28 d, 95 °F → 28 × 250 = 7000; 6500; 500   (above 90: outside the baseline range)
  //   31 d, 35 °F → 31 × 100 = 3100; 3100; 0     (below 40: outside the baseline range)
  // Σ adjusted = 17750; Σ actual = 16500; avoided energy = 1250; F = 1250/17750 = 0.0704225…
  // Outside-range share = (7000 + 3100)/17750 = 0.5690141…
  const reporting = periodsFromPoints(
    [
      { temp: 75, usePerDay: 4000 / 31, days: 31 },
      { temp: 60, usePerDay: 2900 / 30, days: 30 },
      { temp: 95, usePerDay: 6500 / 28, days: 28 },
      { temp: 35, usePerDay: 3100 / 31, days: 31 },
    ],
    '2033-01-01',
  );
  const result = computeSavings(exactBaseline(), reporting);

  it('per period: adjusted baseline = days × f(mean temperature), savings = adjusted − actual', () => {
    const expected = [
      { adjustedBaseline: 4650, actual: 4000, savings: 650, outsideBaselineRange: false },
      { adjustedBaseline: 3000, actual: 2900, savings: 100, outsideBaselineRange: false },
      { adjustedBaseline: 7000, actual: 6500, savings: 500, outsideBaselineRange: true },
      { adjustedBaseline: 3100, actual: 3100, savings: 0, outsideBaselineRange: true },
    ];
    expect(result.periods).toHaveLength(4);
    result.periods.forEach((period, i) => {
      const want = expected[i]!;
      expect(period.adjustedBaseline).toBeCloseTo(want.adjustedBaseline, 6);
      expect(period.actual).toBeCloseTo(want.actual, 9);
      expect(period.savings).toBeCloseTo(want.savings, 6);
      expect(period.outsideBaselineRange).toBe(want.outsideBaselineRange);
    });
  });

  it('totals: Σ adjusted, Σ actual, avoided energy, fraction saved, outside-range share', () => {
    expect(result.totals.adjustedBaseline).toBeCloseTo(17750, 6);
    expect(result.totals.actual).toBeCloseTo(16500, 9);
    expect(result.totals.savings).toBeCloseTo(1250, 6);
    expect(result.totals.savings).toBeCloseTo(
      result.periods.reduce((a, p) => a + p.savings, 0),
      9,
    );
    expect(result.totals.fractionSaved).toBeCloseTo(1250 / 17750, 12);
    expect(result.totals.outsideRangeShare).toBeCloseTo(10100 / 17750, 12);
    expect(result.baselineTemperatureRange).toEqual({ min: 40, max: 90 });
    expect(result.model).toBe('3PC');
  });

  it('non-routine adjustments enter the adjusted baseline of the periods they cover, not the uncertainty', () => {
    // hand-worked: the periods run 2033-01-01..02-01..03-03..03-31..05-01.
    // A: 200 over 2033-01-22..02-11 (20 days, 10 a day): 10 days in period 1 (+100), 10 in period 2 (+100).
    // B: −5 a day over 2033-04-01..04-11 (10 days), all in period 4 (−50).
    // Σ adjustments = 150; adjusted baseline = 17750 + 150 = 17900; avoided energy = 1400.
    const adjustments = [
      {
        id: 'A',
        start: '2033-01-22',
        end: '2033-02-11',
        quantity: 200,
        perDay: null,
        reason: 'added floor area (test)',
      },
      { id: 'B', start: '2033-04-01', end: '2033-04-11', quantity: null, perDay: -5, reason: 'closed wing (test)' },
    ];
    const adjusted = computeSavings(exactBaseline(), reporting, { adjustments });
    expect(adjusted.periods.map((p) => p.adjustment)).toEqual([100, 100, 0, -50].map((v) => expect.closeTo(v, 9)));
    expect(adjusted.periods[0]!.adjustedBaseline).toBeCloseTo(4650 + 100, 6);
    expect(adjusted.periods[0]!.modelBaseline).toBeCloseTo(4650, 6);
    expect(adjusted.totals.modelBaseline).toBeCloseTo(17750, 6);
    expect(adjusted.totals.adjustments).toBeCloseTo(150, 9);
    expect(adjusted.totals.adjustedBaseline).toBeCloseTo(17900, 6);
    expect(adjusted.totals.savings).toBeCloseTo(1400, 6);
    expect(adjusted.totals.fractionSaved).toBeCloseTo(1400 / 17900, 12);
    expect(adjusted.totals.outsideRangeShare).toBeCloseTo(10100 / 17750, 12); // share of the model's own projection
    // A noisy baseline (synthetic), so the uncertainties are not zero: the adjustment moves S, not ΔS.
    const noisy = noisyBaseline(6);
    const year = reportingYear(0.1);
    const plain = computeSavings(noisy, year);
    const withAdjustment = computeSavings(noisy, year, {
      adjustments: [{ ...adjustments[0]!, start: year[0]!.start, end: year[1]!.end, quantity: 900 }],
    });
    expect(withAdjustment.totals.savings).toBeCloseTo(plain.totals.savings + 900, 6);
    for (const formula of ['guideline14', 'exact'] as const) {
      const before = plain.totals.uncertainty[formula];
      expect(before.absolute).toBeGreaterThan(1);
      expect(withAdjustment.totals.uncertainty[formula].absolute).toBeCloseTo(before.absolute, 6);
      expect(withAdjustment.totals.uncertainty[formula].fractional).toBeCloseTo(
        before.absolute / withAdjustment.totals.savings,
        9,
      );
    }
  });

  it('an adjustment’s own ± is shown at the confidence and combined with the model’s larger ±', () => {
    // The reporting year runs 2033-01-01..2033-12-27 (12 periods of 30 days); a noisy baseline (synthetic).
    // hand-worked: A lies wholly inside, ± 300 → 300; B covers [12-17, 2034-01-16), 30 days, ± 1,200, of which
    // 10 days fall in the year → 1,200 × 10/30 = 400; together √(300² + 400²) = 500 (one standard deviation).
    // At 90% confidence × z = 1.6448536269514715 (Python's statistics.NormalDist, test/reference/normal-quantiles.py).
    const noisy = noisyBaseline(6);
    const year = reportingYear(0.1);
    const adjustments = [
      {
        id: 'A',
        start: '2033-01-01',
        end: '2033-01-31',
        quantity: 900,
        perDay: null,
        reason: 'added floor area (test)',
        uncertainty: 300,
      },
      {
        id: 'B',
        start: '2033-12-17',
        end: '2034-01-16',
        quantity: null,
        perDay: 10,
        reason: 'new equipment (test)',
        uncertainty: 1200,
      },
    ];
    const plain = computeSavings(noisy, year, {
      confidence: 0.9,
      adjustments: adjustments.map(({ uncertainty: _u, ...a }) => a),
    });
    const result = computeSavings(noisy, year, { confidence: 0.9, adjustments });
    const u = result.totals.uncertainty;
    expect(u.adjustments.absolute).toBeCloseTo(500 * 1.6448536269514715, 9);
    expect(plain.totals.uncertainty.adjustments.absolute).toBe(0);
    // The model's own ± are untouched by the adjustments' ±.
    expect(u.guideline14).toEqual(plain.totals.uncertainty.guideline14);
    expect(u.exact).toEqual(plain.totals.uncertainty.exact);
    const model = Math.max(u.guideline14.absolute, u.exact.absolute);
    expect(model).toBeGreaterThan(1);
    expect(u.combined.absolute).toBeCloseTo(Math.sqrt(model ** 2 + (500 * 1.6448536269514715) ** 2), 9);
    expect(u.combined.fractional).toBeCloseTo(u.combined.absolute / Math.abs(result.totals.savings), 12);
    // Without stated ±, the combined ± is the model's larger one.
    expect(plain.totals.uncertainty.combined.absolute).toBeCloseTo(
      Math.max(plain.totals.uncertainty.guideline14.absolute, plain.totals.uncertainty.exact.absolute),
      9,
    );
    // At 68% the same 500 scales by z = 0.9944578832097535 (the same reference).
    expect(computeSavings(noisy, year, { adjustments }).totals.uncertainty.adjustments.absolute).toBeCloseTo(
      500 * 0.9944578832097535,
      9,
    );
  });

  it('a period exactly at the edge of the baseline range is inside it', () => {
    const edges = periodsFromPoints(
      [
        { temp: 40, usePerDay: 100, days: 30 },
        { temp: 90, usePerDay: 200, days: 30 },
      ],
      '2033-01-01',
    );
    const edgeResult = computeSavings(exactBaseline(), edges);
    expect(edgeResult.periods.map((p) => p.outsideBaselineRange)).toEqual([false, false]);
    expect(edgeResult.totals.outsideRangeShare).toBe(0);
  });

  it('periods are reported in time order whatever order they arrive in', () => {
    const reversed = computeSavings(exactBaseline(), [...reporting].reverse());
    expect(reversed.periods.map((p) => p.start)).toEqual(reporting.map((p) => p.start));
  });
});

describe('uncertainty of avoided energy', () => {
  const baseline = noisyBaseline(5);
  const reporting = reportingYear(0.1);

  it('grows with the confidence level, and only through t', () => {
    const results = CONFIDENCE_LEVELS.map((confidence) => computeSavings(baseline, reporting, { confidence }));
    for (let i = 1; i < results.length; i++) {
      const lower = results[i - 1]!.totals.uncertainty;
      const higher = results[i]!.totals.uncertainty;
      expect(higher.exact.absolute).toBeGreaterThan(lower.exact.absolute);
      expect(higher.guideline14.fractional).toBeGreaterThan(lower.guideline14.fractional);
    }
    // Both formulas are linear in t (brief): the ratio of uncertainties is the ratio of t values.
    const first = results[0]!;
    for (const r of results) {
      const ratio = r.uncertaintyInputs.t / first.uncertaintyInputs.t;
      expect(r.totals.uncertainty.exact.absolute / first.totals.uncertainty.exact.absolute).toBeCloseTo(ratio, 12);
      expect(r.totals.uncertainty.guideline14.fractional / first.totals.uncertainty.guideline14.fractional).toBeCloseTo(
        ratio,
        12,
      );
      expect(r.totals.savings).toBe(first.totals.savings);
    }
  });

  it('the Guideline 14 figure is the Annex B formula applied to the reported inputs', () => {
    // ΔS/S = t · 1.26 · CV · sqrt((n/n′)·(1 + 2/n)·(1/m)) / F  (ASHRAE Guideline 14 Annex B, as in the brief)
    const r = computeSavings(baseline, reporting, { confidence: 0.9 });
    const { t, cvrmse, n, nPrime, m } = r.uncertaintyInputs;
    const expected = (t * 1.26 * cvrmse * Math.sqrt((n / nPrime) * (1 + 2 / n) * (1 / m))) / r.totals.fractionSaved;
    expect(r.totals.uncertainty.guideline14.fractional).toBeCloseTo(expected, 12);
    expect(r.totals.uncertainty.guideline14.absolute).toBeCloseTo(expected * r.totals.savings, 9);
    expect(n).toBe(36);
    expect(m).toBe(12);
    expect(cvrmse).toBe(baseline.stats.cvrmse);
    // n′ = n(1 − ρ)/(1 + ρ) with ρ < 0 treated as 0 (brief; common practice)
    const rho = Math.max(0, baseline.stats.autocorrelation);
    expect(nPrime).toBeCloseTo((36 * (1 - rho)) / (1 + rho), 12);
  });

  it('without the autocorrelation correction n′ = n, and the uncertainty is no larger', () => {
    // synthetic: residuals made to run in spells (a slow wave added to the 3PC), so ρ > 0
    const points = Array.from({ length: 36 }, (_, i) => {
      const temp = Math.round((40 + (50 * ((i * 7) % 36)) / 35) * 10) / 10;
      return { temp, usePerDay: hinge(temp, COOLING) + 6 * Math.sin((2 * Math.PI * i) / 18), days: 30 };
    });
    const spells = fitted(periodsFromPoints(points));
    expect(spells.stats.autocorrelation).toBeGreaterThan(0.3);
    const corrected = computeSavings(spells, reporting);
    const plain = computeSavings(spells, reporting, { autocorrelationCorrection: false });
    expect(plain.uncertaintyInputs.nPrime).toBe(36);
    expect(corrected.uncertaintyInputs.nPrime).toBeLessThan(36);
    expect(plain.totals.uncertainty.exact.absolute).toBeLessThan(corrected.totals.uncertainty.exact.absolute);
    expect(plain.totals.uncertainty.guideline14.fractional).toBeLessThan(
      corrected.totals.uncertainty.guideline14.fractional,
    );
  });

  it('the "significant" verdict flips from true to false as baseline noise grows', () => {
    // synthetic: 10% savings; the same reporting year against ever noisier baselines
    const verdicts = [2, 5, 60, 120].map((noise) => computeSavings(noisyBaseline(noise), reporting));
    expect(verdicts.map((v) => v.totals.significant)).toEqual([true, true, false, false]);
    // the verdict follows the rule: the larger of the two fractional uncertainties at 68% below 50%
    // (ASHRAE Guideline 14, from memory; see the brief)
    for (const v of verdicts) {
      const worst = Math.max(v.significance.fractionalAt68.guideline14, v.significance.fractionalAt68.exact);
      expect(v.totals.significant).toBe(worst < 0.5);
    }
    // uncertainty grows with the noise
    const exactAt68 = verdicts.map((v) => v.significance.fractionalAt68.exact);
    expect([...exactAt68].sort((a, b) => a - b)).toEqual(exactAt68);
  });

  it('zero avoided energy gives an infinite fractional uncertainty, a finite absolute one, and no crash', () => {
    // actual set to exactly what the baseline predicts: savings are exactly 0
    const asPredicted = reporting.map((period) => {
      const quantity =
        period.days * predictPerDay(baseline.model, baseline.changepoints, baseline.rawCoefficients, period.meanTemp);
      return { ...period, quantity, usePerDay: quantity / period.days };
    });
    const result = computeSavings(baseline, asPredicted);
    expect(result.totals.savings).toBe(0);
    expect(result.totals.fractionSaved).toBe(0);
    expect(result.totals.uncertainty.guideline14.fractional).toBe(Number.POSITIVE_INFINITY);
    expect(result.totals.uncertainty.exact.fractional).toBe(Number.POSITIVE_INFINITY);
    expect(Number.isFinite(result.totals.uncertainty.exact.absolute)).toBe(true);
    expect(result.totals.uncertainty.exact.absolute).toBeGreaterThan(0);
    expect(result.totals.significant).toBe(false);
  });

  it('rejects a confidence outside (0, 1) and an empty reporting period list', () => {
    expect(() => computeSavings(baseline, reporting, { confidence: 0 })).toThrow(RangeError);
    expect(() => computeSavings(baseline, reporting, { confidence: 1 })).toThrow(RangeError);
    expect(() => computeSavings(baseline, [])).toThrow(/no reporting periods/);
  });
});

describe('analyseSavings: readings and weather in, a savings document out', () => {
  // One invented building on monthly bills in the temperate climate: two baseline years, then a
  // reporting year in which the building uses 12% less (synthetic: the test sets the truth).
  const weather = dailyWeather(CLIMATES.temperate, '2031-01-01', 4 * 365 + 1, seededRandom(21));
  const all = monthlyReadings(SAMPLE_BUILDING, weather, '2031-01-01', 36, seededRandom(22));
  const baselineReadings = all.slice(0, 24);
  const reportingReadings = all.slice(24).map((r) => ({ ...r, quantity: 0.88 * r.quantity }));
  const baseline = analyseBaseline(baselineReadings, weather);

  it('uses the selected model by default and finds about 12% savings', () => {
    const doc = analyseSavings(baseline, reportingReadings, weather);
    expect(doc.model).toBe(baseline.choice.selected);
    expect(doc.baseline.selected).toBe(baseline.choice.selected);
    expect(doc.totals.fractionSaved).toBeGreaterThan(0.1);
    expect(doc.totals.fractionSaved).toBeLessThan(0.14);
    expect(doc.periods).toHaveLength(12);
  });

  it('an engineer’s override picks another fitted shape', () => {
    const doc = analyseSavings(baseline, reportingReadings, weather, { model: '2P' });
    expect(doc.model).toBe('2P');
    expect(doc.baseline.selected).toBe('2P');
    const twoP = baseline.choice.candidates.find((c) => c.model === '2P')!.fit!;
    expect(doc.uncertaintyInputs.cvrmse).toBe(twoP.stats.cvrmse);
    expect(doc.baseline.guideline14!.cvrmse.value).toBe(twoP.stats.cvrmse);
  });

  it('an override naming a shape that was not fitted is refused', () => {
    const restricted = analyseBaseline(baselineReadings, weather, { models: ['1P', '3PC'] });
    expect(() => analyseSavings(restricted, reportingReadings, weather, { model: '5P' })).toThrow(
      /the 5P shape could not be fitted/,
    );
  });

  it('the CV(RMSE) limit follows the reporting length (from memory: 20% under 12 months, 25% for 12–60)', () => {
    const year = analyseSavings(baseline, reportingReadings, weather);
    // hand-worked: the calendar year 2033 is 12 calendar months, so the 12–60-month limit applies
    expect(year.baseline.reportingMonths).toBe(12);
    expect(year.baseline.guideline14!.cvrmse.limit).toBe(0.25);
    const shorter = analyseSavings(baseline, reportingReadings.slice(0, 11), weather);
    expect(shorter.baseline.guideline14!.cvrmse.limit).toBe(0.2); // hand-worked: 11 calendar months
    const longer = monthlyReadings(SAMPLE_BUILDING, weather, '2033-01-01', 13, seededRandom(23));
    expect(analyseSavings(baseline, longer, weather).baseline.guideline14!.cvrmse.limit).toBe(0.25);
    expect(
      analyseSavings(baseline, reportingReadings, weather, { cvrmseLimit: 0.1 }).baseline.guideline14!.cvrmse.limit,
    ).toBe(0.1);
  });

  it('a reporting bill without enough weather is left out and listed', () => {
    const partial = weather.filter((day) => !(day.date >= '2033-03-05' && day.date < '2033-03-20'));
    const doc = analyseSavings(baseline, reportingReadings, partial);
    expect(doc.periods).toHaveLength(11);
    expect(doc.excluded.reporting).toHaveLength(1);
    expect(doc.excluded.reporting[0]!.start).toBe('2033-03-01');
    expect(doc.excluded.reporting[0]!.index).toBe(2);
    expect(doc.excluded.baseline).toEqual([]);
  });
});
