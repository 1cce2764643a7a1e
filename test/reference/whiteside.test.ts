import { readFileSync } from 'node:fs';
import { describe, it, expect } from 'vitest';
import {
  chooseBaseline,
  computeSavings,
  fitShape,
  type Period,
  type ShapeFit,
  type ShapeFitResult,
} from '../../src/engine/index.js';
import { periodsFromPoints } from '../support/synthetic.js';

/**
 * The engine on real data, checked against R. The data are `whiteside` from
 * R's MASS package (Venables and Ripley, Modern Applied Statistics with S,
 * 4th ed., §6.1): one house's weekly gas use and mean outside temperature,
 * 26 weeks before and 30 weeks after cavity-wall insulation. Every expected
 * value comes from test/reference/whiteside-fixture.json, written by
 * test/reference/make-whiteside-fixture.R (R's lm, predict, vcov, qt, acf;
 * see its header for versions and how to rerun).
 *
 * How the engine sees the data (the script's header derives the scale
 * factors): each week is a period of 7 days, quantity = Gas (1000 ft³ in the
 * week), usePerDay = Gas / 7, meanTemp = Temp (°C). With every weight 7 the
 * engine's weighted fit of use per day is R's lm(Gas ~ Temp) divided by 7:
 * coefficients, their standard errors and the fit's SSE are R's / 7, the
 * per-day residual variance is σ²_R / 7, t values are equal, and a week's
 * model baseline, the savings and the exact savings variance are R's own
 * figures unscaled. The weeks carry no dates: the test gives them
 * consecutive placeholder weeks in the order R lists them.
 */

interface Week {
  temp: number;
  gas: number;
  fit: number;
  seFit: number;
  predictionHalfWidth68: number;
  predictionHalfWidth90: number;
}

interface Fixture {
  rowsSortedByTemperature: boolean;
  rows: { insul: 'Before' | 'After'; temp: number; gas: number }[];
  before: {
    n: number;
    coefficients: [number, number];
    standardErrors: [number, number];
    tValues: [number, number];
    residualStandardError: number;
    dfResidual: number;
    sse: number;
    rSquared: number;
    perDay: { coefficients: [number, number]; standardErrors: [number, number]; residualVariance: number };
    residualsInRowOrder: { lag1Autocorrelation: number; lag1AutocorrelationAcf: number; durbinWatson: number };
  };
  after: {
    m: number;
    weeks: Week[];
    sumPredictions: number;
    sumGas: number;
    savings: number;
    sumPredictionsStandardError: number;
    exactSavingsVariance: number;
    bands: { confidence: number; tCritical: number; halfWidth: number }[];
  };
  shapeCheck: {
    quadratic: { estimate: number; tValue: number; pValue: number };
    admissibleChangepoints: [number, number];
    heatingHinge: {
      changepoint: number;
      sse: number;
      coefficients: [number, number];
      standardErrors: [number, number];
      standardErrorsChangepointCounted: [number, number];
      fAgainstLine: number;
      fCritical05: number;
    };
    brokenLine: {
      changepoint: number;
      changepointByIntersection: number | null;
      sse: number;
      slopeBelow: number;
      slopeAbove: number;
      fAgainstLine: number;
      fCritical05: number;
    };
  };
}

const fixture = JSON.parse(readFileSync(new URL('./whiteside-fixture.json', import.meta.url), 'utf8')) as Fixture;

const DAYS = 7; // a week: the data are weekly totals
const LEAST_SQUARES = 1e-9; // relative: R (QR) and the engine (normal equations) solve the same well-conditioned problem in double precision; they meet near 1e-14
const T_QUANTILE = 1e-6; // relative: the engine's t quantile (jstat) meets R's qt to 3e-8 here (90%, 24 df), and scipy's to 1e-6 (test/engine/stats/distributions.test.ts)
const NUMERIC_CHANGEPOINT = 1e-6; // °C: R's optimize() places a changepoint only to ~1e-8, the SSE being flat at its minimum

function expectRelativelyClose(actual: number, expected: number, tolerance: number, what = ''): void {
  const scale = Math.max(Math.abs(expected), Number.MIN_VALUE);
  expect(Math.abs(actual - expected) / scale, `${what} actual ${actual}, expected ${expected}`).toBeLessThanOrEqual(
    tolerance,
  );
}

function weeks(group: 'Before' | 'After'): { temp: number; usePerDay: number; days: number }[] {
  return fixture.rows
    .filter((row) => row.insul === group)
    .map((row) => ({ temp: row.temp, usePerDay: row.gas / DAYS, days: DAYS }));
}

const before: Period[] = periodsFromPoints(weeks('Before'), '2001-01-01');
const after: Period[] = periodsFromPoints(weeks('After'), before[before.length - 1]!.end);

function fitted(result: ShapeFitResult): ShapeFit {
  if (!result.ok) throw new Error(`${result.model} not fitted: ${result.reason}`);
  return result;
}

const line = fitted(fitShape(before, '2P', 3));
const noCorrection = { autocorrelationCorrection: false } as const;

describe('whiteside data as R gives them', () => {
  it('26 weeks before and 30 after the insulation, each group listed by rising temperature', () => {
    expect(before).toHaveLength(fixture.before.n); // R: nrow(subset(whiteside, Insul == "Before"))
    expect(after).toHaveLength(fixture.after.m); // R: nrow(subset(whiteside, Insul == "After"))
    expect([before.length, after.length]).toEqual([26, 30]); // MASS ?whiteside: "one of 26 weeks before, and one of 30 weeks after"
    // R: !is.unsorted(Temp) in each group, so the row order (and the engine's placeholder dates) is temperature order, not time.
    expect(fixture.rowsSortedByTemperature).toBe(true);
  });
});

describe('the Before fit (2P) against R lm(Gas ~ Temp)', () => {
  it('coefficients: per day, R’s divided by 7', () => {
    const [intercept, slope] = fixture.before.coefficients; // R: coef(lm(Gas ~ Temp, Before)), per week
    expectRelativelyClose(line.parameters.intercept!, intercept / DAYS, LEAST_SQUARES, 'intercept');
    expectRelativelyClose(line.parameters.slope!, slope / DAYS, LEAST_SQUARES, 'slope');
    // R's weighted per-day fit, lm(I(Gas/7) ~ Temp, weights = 7), states the same directly.
    expectRelativelyClose(
      line.rawCoefficients[0]!,
      fixture.before.perDay.coefficients[0],
      LEAST_SQUARES,
      'intercept per day',
    );
    expectRelativelyClose(
      line.rawCoefficients[1]!,
      fixture.before.perDay.coefficients[1],
      LEAST_SQUARES,
      'slope per day',
    );
  });

  it('coefficient standard errors and t values', () => {
    line.coefficients.forEach((coefficient, j) => {
      expectRelativelyClose(
        coefficient.standardError,
        fixture.before.standardErrors[j]! / DAYS,
        LEAST_SQUARES,
        `SE ${coefficient.name}`,
      ); // R: summary(fit) Std. Error
      expectRelativelyClose(
        coefficient.standardError,
        fixture.before.perDay.standardErrors[j]!,
        LEAST_SQUARES,
        `SE ${coefficient.name} per day`,
      ); // R: weighted per-day fit
      expectRelativelyClose(coefficient.tStat, fixture.before.tValues[j]!, LEAST_SQUARES, `t ${coefficient.name}`); // R: summary(fit) t value
    });
  });

  it('residual variance, SSE, RMSE and R²', () => {
    const sigma = fixture.before.residualStandardError; // R: summary(fit)$sigma, on fit$df.residual = 24
    expect(line.n - line.p).toBe(fixture.before.dfResidual);
    expectRelativelyClose(line.residualVariance, sigma ** 2 / DAYS, LEAST_SQUARES, 'σ² per day');
    expectRelativelyClose(
      line.residualVariance,
      fixture.before.perDay.residualVariance,
      LEAST_SQUARES,
      'σ² per day (R weighted)',
    );
    expectRelativelyClose(line.sse, fixture.before.sse / DAYS, LEAST_SQUARES, 'SSE'); // R: deviance(fit)
    // Energy residuals are R's residuals (Gas − fitted Gas), so the energy RMSE is R's σ.
    expectRelativelyClose(line.stats.rmse, sigma, LEAST_SQUARES, 'RMSE');
    expectRelativelyClose(line.stats.r2, fixture.before.rSquared, LEAST_SQUARES, 'R²'); // R: summary(fit)$r.squared
  });
});

describe('the projection onto the After weeks against R predict()', () => {
  const result = computeSavings(line, after, noCorrection);

  it('every week’s adjusted baseline is R’s prediction for it', () => {
    expect(result.periods).toHaveLength(fixture.after.weeks.length);
    result.periods.forEach((period, j) => {
      const week = fixture.after.weeks[j]!; // R: predict(fit, newdata = After, se.fit = TRUE)
      expect(period.meanTemp).toBe(week.temp);
      expectRelativelyClose(period.actual, week.gas, LEAST_SQUARES, `week ${j} actual`);
      expectRelativelyClose(period.modelBaseline, week.fit, LEAST_SQUARES, `week ${j} baseline`);
      expectRelativelyClose(period.adjustedBaseline, week.fit, LEAST_SQUARES, `week ${j} adjusted baseline`);
    });
  });

  it('one week’s exact variance is se.fit² + σ², its band R’s prediction interval', () => {
    const sigma2 = fixture.before.residualStandardError ** 2; // R: summary(fit)$sigma²
    fixture.after.weeks.forEach((week, j) => {
      const single = computeSavings(line, [after[j]!], { ...noCorrection, confidence: 0.9 });
      const variance = (single.totals.uncertainty.exact.absolute / single.uncertaintyInputs.t) ** 2;
      expectRelativelyClose(Math.sqrt(variance - sigma2), week.seFit, LEAST_SQUARES, `week ${j} se.fit`); // R: predict(..., se.fit = TRUE)$se.fit
      expectRelativelyClose(
        single.totals.uncertainty.exact.absolute,
        week.predictionHalfWidth90,
        T_QUANTILE,
        `week ${j} 90%`,
      ); // R: predict(..., interval = "prediction", level = 0.9)
      const at68 = computeSavings(line, [after[j]!], { ...noCorrection, confidence: 0.68 });
      expectRelativelyClose(
        at68.totals.uncertainty.exact.absolute,
        week.predictionHalfWidth68,
        T_QUANTILE,
        `week ${j} 68%`,
      ); // R: the same at level = 0.68
    });
  });

  it('total adjusted baseline, actual use and savings', () => {
    expectRelativelyClose(result.totals.adjustedBaseline, fixture.after.sumPredictions, LEAST_SQUARES, 'Σ baseline'); // R: sum(predict(fit, After))
    expectRelativelyClose(result.totals.actual, fixture.after.sumGas, LEAST_SQUARES, 'Σ actual'); // R: sum(After$Gas)
    expectRelativelyClose(result.totals.savings, fixture.after.savings, LEAST_SQUARES, 'savings'); // R: the difference of the two
    // Hand-checked from the data: After temperatures (−0.7 … 9.7 °C) lie inside the Before range (−0.8 … 10.2 °C).
    expect(result.totals.outsideRangeShare).toBe(0);
  });

  it('the exact savings variance is R’s c₀ᵀ·vcov·c₀ + m·σ²', () => {
    const variance = (result.totals.uncertainty.exact.absolute / result.uncertaintyInputs.t) ** 2;
    expectRelativelyClose(variance, fixture.after.exactSavingsVariance, LEAST_SQUARES, 'Var(S)'); // R: see the script (checked there two ways)
    // Its model part alone: R's standard error of the summed predictions.
    const modelPart = variance - fixture.after.m * fixture.before.residualStandardError ** 2;
    expectRelativelyClose(
      Math.sqrt(modelPart),
      fixture.after.sumPredictionsStandardError,
      LEAST_SQUARES,
      'SE of Σ predictions',
    ); // R: sqrt(c₀ᵀ vcov(fit) c₀)
  });

  it('the exact-variance band at 68% and 90%: R’s t quantile on 24 degrees of freedom times √Var', () => {
    for (const band of fixture.after.bands) {
      const at = computeSavings(line, after, { ...noCorrection, confidence: band.confidence });
      expectRelativelyClose(at.uncertaintyInputs.t, band.tCritical, T_QUANTILE, `t at ${band.confidence}`); // R: qt(1 − (1 − level)/2, 24)
      expectRelativelyClose(
        at.totals.uncertainty.exact.absolute,
        band.halfWidth,
        T_QUANTILE,
        `band at ${band.confidence}`,
      ); // R: qt(…) · sqrt(Var)
    }
  });
});

describe('the autocorrelation correction on this series', () => {
  it('the engine’s lag-1 autocorrelation and Durbin–Watson are R’s, in row order', () => {
    const residuals = fixture.before.residualsInRowOrder; // R: residuals(fit) in row order
    expectRelativelyClose(line.stats.autocorrelation, residuals.lag1Autocorrelation, LEAST_SQUARES, 'ρ'); // R: Σ rₜrₜ₋₁ / Σ rₜ²
    expectRelativelyClose(line.stats.autocorrelation, residuals.lag1AutocorrelationAcf, LEAST_SQUARES, 'ρ (acf)'); // R: acf(r, lag.max = 1)
    expectRelativelyClose(line.stats.durbinWatson, residuals.durbinWatson, LEAST_SQUARES, 'Durbin–Watson'); // R: Σ(Δr)² / Σ r²
  });

  it('ρ is negative, so n′ = n and the default band equals the uncorrected one (the correction never narrows)', () => {
    // R's ρ ≈ −0.23 is measured along rising temperature (the rows' order), not time: it says the
    // line leaves no run of same-signed residuals along temperature, nothing about week-to-week persistence.
    expect(fixture.before.residualsInRowOrder.lag1Autocorrelation).toBeLessThan(0);
    const corrected = computeSavings(line, after); // default: autocorrelationCorrection on
    const plain = computeSavings(line, after, noCorrection);
    expect(corrected.uncertaintyInputs.nPrime).toBe(fixture.before.n); // n′ = n(1 − ρ)/(1 + ρ) with ρ < 0 taken as 0 (savings-uncertainty.ts)
    expect(corrected.totals.uncertainty.exact.absolute).toBe(plain.totals.uncertainty.exact.absolute);
    expect(corrected.totals.uncertainty.guideline14.absolute).toBe(plain.totals.uncertainty.guideline14.absolute);
  });
});

describe('the shape choice on the Before weeks', () => {
  const choice = chooseBaseline(before);
  const candidate = (model: string): ShapeFit => {
    const fit = choice.candidates.find((c) => c.model === model)?.fit;
    if (!fit) throw new Error(`${model} was not fitted`);
    return fit;
  };
  const { heatingHinge, brokenLine, quadratic } = fixture.shapeCheck;

  it('the engine’s 3PH is R’s heating hinge profiled over the admissible changepoints', () => {
    const hinge = candidate('3PH');
    // R: the SSE of Gas ~ pmax(c − Temp, 0), minimised over c with ≥ 3 weeks on each side; the
    // minimum sits on the upper end of that range (8.5 °C): the weeks never level off.
    expect(heatingHinge.changepoint).toBe(fixture.shapeCheck.admissibleChangepoints[1]);
    expect(Math.abs(hinge.changepoints.heating! - heatingHinge.changepoint)).toBeLessThanOrEqual(NUMERIC_CHANGEPOINT);
    expectRelativelyClose(hinge.sse, heatingHinge.sse / DAYS, LEAST_SQUARES, '3PH SSE');
    expectRelativelyClose(hinge.parameters.base!, heatingHinge.coefficients[0] / DAYS, LEAST_SQUARES, '3PH base');
    // R's coefficient multiplies (c − Temp)₊, so dy/dx is its negative.
    expectRelativelyClose(
      hinge.parameters.heatingSlope!,
      -heatingHinge.coefficients[1] / DAYS,
      LEAST_SQUARES,
      '3PH slope',
    );
    // The engine counts the changepoint as a parameter (σ² = SSE/(n − 3)); lm() at a fixed c leaves
    // n − 2 df. The script states R's standard errors both ways.
    hinge.coefficients.forEach((c, j) => {
      expectRelativelyClose(
        c.standardError,
        heatingHinge.standardErrorsChangepointCounted[j]! / DAYS,
        LEAST_SQUARES,
        `3PH SE ${c.name}`,
      );
      expectRelativelyClose(
        c.standardError,
        (heatingHinge.standardErrors[j]! / DAYS) * Math.sqrt((hinge.n - 2) / (hinge.n - 3)),
        LEAST_SQUARES,
        `3PH SE ${c.name} rescaled`,
      ); // R: lm's SE × √((n − 2)/(n − 3))
    });
  });

  it('the engine’s 4P is R’s broken line profiled over the changepoint', () => {
    const broken = candidate('4P');
    expect(Math.abs(broken.changepoints.heating! - brokenLine.changepoint)).toBeLessThanOrEqual(NUMERIC_CHANGEPOINT); // R: optimize() on the SSE profile
    expect(brokenLine.changepointByIntersection).not.toBeNull();
    expectRelativelyClose(
      broken.changepoints.heating!,
      brokenLine.changepointByIntersection!,
      LEAST_SQUARES,
      '4P changepoint',
    ); // R: the two side lines' intersection
    expectRelativelyClose(broken.sse, brokenLine.sse / DAYS, LEAST_SQUARES, '4P SSE');
    expectRelativelyClose(broken.parameters.slopeBelow!, brokenLine.slopeBelow / DAYS, LEAST_SQUARES, '4P slope below');
    expectRelativelyClose(broken.parameters.slopeAbove!, brokenLine.slopeAbove / DAYS, LEAST_SQUARES, '4P slope above');
  });

  it('R finds nothing better than a straight line on these weeks', () => {
    // Venables and Ripley's own check (§6.1): a quadratic term is not significant.
    expect(quadratic.pValue).toBeGreaterThan(0.05); // R: summary(lm(Gas ~ Temp + I(Temp^2)))
    // The heating hinge fits worse than the line at every admissible changepoint (F < 0) …
    expect(heatingHinge.fAgainstLine).toBeLessThan(0); // R: extra-sum-of-squares F, 1 and 23 df
    // … and the broken line's gain is far from significant, though this F (the changepoint
    // searched) is if anything too ready to pass.
    expect(brokenLine.fAgainstLine).toBeLessThan(brokenLine.fCritical05); // R: F on 2 and 22 df against qf(0.95, 2, 22)
    // Its bend is concave (use falls faster on milder weeks), not a heating knee levelling off.
    expect(brokenLine.slopeAbove).toBeLessThan(brokenLine.slopeBelow);
  });

  it('the engine picks a heating shape with a significant negative slope: the straight line R supports', () => {
    // Sound: all Before weeks are heating weather (−0.8 … 10.2 °C), so use must fall as it warms.
    expect(['2P', '3PH']).toContain(choice.selected);
    const selected = candidate(choice.selected);
    const slope = selected.coefficients.find((c) => c.name === 'slope' || c.name === 'heatingSlope')!;
    expect(slope.estimate).toBeLessThan(0);
    // Selection implies screening passed: the slope is significant (R: t = −20.1 on 24 df).
    expect(choice.candidates.find((c) => c.model === choice.selected)!.accepted).toBe(true);
    // Which of the two follows from R: a hinge is worth its parameter only if its F passes.
    const expected = heatingHinge.fAgainstLine > heatingHinge.fCritical05 ? '3PH' : '2P';
    expect(choice.selected).toBe(expected);
    // The alternatives are left for the reasons R's figures give.
    const verdict = (model: string) => choice.candidates.find((c) => c.model === model)!.verdict;
    expect(verdict('4P')).toBe('rejected'); // concave bend (R: slope above < slope below)
    expect(verdict('3PC')).toBe('rejected'); // a cooling shape in heating weather: its slope has the wrong sign
    expect(verdict('1P')).toBe('accepted'); // the mean model, improved on by the line (R: t = −20.1)
  });
});
