import { describe, it, expect } from 'vitest';
import { readFileSync } from 'node:fs';
import { fitShape } from '../../../src/engine/fit/fit-shape.js';
import { fPValue } from '../../../src/engine/stats/distributions.js';
import type { Period } from '../../../src/engine/types.js';
import { dayResolvedGridSearch, dayResolvedSse } from '../../support/day-resolved-grid.js';
import { periodOfDays, seededRandom } from '../../support/synthetic.js';

/**
 * Changepoint shapes with linear terms in independent variables.
 *  - Against statsmodels (reference library: test/reference/make-wls-fixtures.py
 *    writes variables-fixtures.json; its changepoints come from a plain
 *    search with scipy's minimisers, its coefficients, standard errors, t and
 *    partial F from statsmodels WLS at them).
 *  - The day-resolved form with variables against the plain grid of
 *    test/support/day-resolved-grid.ts (the exact optimum is never worse).
 *  - A simulated building whose occupancy effect the test sets (synthetic:
 *    the test sets the truth).
 */

interface VariableCase {
  name: string;
  shape: '3PC' | '3PH' | '4P' | '5P';
  minPoints: number;
  temps: number[];
  usePerDay: number[];
  days: number[];
  variables: Record<string, number[]>;
  heatingChangepoint: number | null;
  coolingChangepoint: number | null;
  sse: number;
  p: number;
  params: number[];
  bse: number[];
  tvalues: number[];
  partialF: { variable: string; f: number; pValue: number; dfDiff: number }[];
}

const fixture = JSON.parse(
  readFileSync(new URL('../../reference/variables-fixtures.json', import.meta.url), 'utf8'),
) as {
  cases: VariableCase[];
};

function date(offset: number): string {
  return new Date(Date.UTC(2030, 0, 1 + offset)).toISOString().slice(0, 10);
}

function casePeriods(c: VariableCase): Period[] {
  let offset = 0;
  return c.temps.map((temp, i) => {
    const days = c.days[i]!;
    const period: Period = {
      start: date(offset),
      end: date(offset + days),
      days,
      quantity: c.usePerDay[i]! * days,
      usePerDay: c.usePerDay[i]!,
      meanTemp: temp,
      coverage: 1,
      estimated: false,
      variables: Object.fromEntries(Object.entries(c.variables).map(([name, values]) => [name, values[i]!])),
    };
    offset += days;
    return period;
  });
}

describe('changepoint shapes with variables against statsmodels (reference library: make-wls-fixtures.py)', () => {
  for (const c of fixture.cases) {
    it(`${c.name}: changepoints, SSE, coefficients, standard errors, t`, () => {
      const names = Object.keys(c.variables);
      const fit = fitShape(casePeriods(c), c.shape, c.minPoints, 'mean', names);
      if (!fit.ok) throw new Error(fit.reason);
      // The exact search is never worse than the reference's minimiser, and lands on the same optimum.
      expect(fit.sse).toBeLessThanOrEqual(c.sse * (1 + 1e-9));
      expect(fit.sse).toBeCloseTo(c.sse, 4);
      if (c.heatingChangepoint !== null) expect(fit.changepoints.heating!).toBeCloseTo(c.heatingChangepoint, 4);
      if (c.coolingChangepoint !== null) expect(fit.changepoints.cooling!).toBeCloseTo(c.coolingChangepoint, 4);
      expect(fit.p).toBe(c.p);
      c.params.forEach((value, j) => expect(fit.rawCoefficients[j]!).toBeCloseTo(value, 4));
      c.bse.forEach((value, j) => expect(fit.coefficients[j]!.standardError / value).toBeCloseTo(1, 5));
      c.tvalues.forEach((value, j) => expect(Math.abs(fit.coefficients[j]!.tStat)).toBeCloseTo(Math.abs(value), 4));
      expect(fit.variables).toEqual(names);
      // A variable's coefficient is reported as fitted (no slope sign convention applies to it).
      names.forEach((name, k) => {
        const j = c.params.length - names.length + k;
        expect(fit.coefficients[j]!.name).toBe(name);
        expect(fit.coefficients[j]!.estimate).toBeCloseTo(c.params[j]!, 4);
        expect(fit.parameters[name]).toBeCloseTo(c.params[j]!, 4);
      });
      for (const name of names) {
        expect(fit.variableRanges![name]!.min).toBe(Math.min(...c.variables[name]!));
      }
    });
    it(`${c.name}: partial F of each variable at fixed changepoints is t² and its p-value matches scipy`, () => {
      const dof = c.temps.length - c.p;
      c.partialF.forEach((test, k) => {
        const t = c.tvalues[c.tvalues.length - c.partialF.length + k]!;
        expect(test.f / (t * t)).toBeCloseTo(1, 9);
        expect(fPValue(test.f, 1, dof)).toBeCloseTo(test.pValue, 8);
      });
    });
  }
});

/** Invented bills of 28–33 days with daily temperatures, an occupancy share and a production total per day (synthetic). */
function billsWithVariables(seed: number, count: number): Period[] {
  const random = seededRandom(seed);
  const periods: Period[] = [];
  let day = 0;
  for (let b = 0; b < count; b++) {
    const length = 28 + Math.floor(random.uniform() * 6);
    const temps = Array.from({ length }, (_, d) => {
      const season = 52 - 26 * Math.cos((2 * Math.PI * (day + d)) / 365);
      return Math.round((season + (random.uniform() - 0.5) * 16) * 10) / 10;
    });
    const occupied = b % 12 === 6 || b % 12 === 7 ? 0.2 + random.uniform() * 0.1 : 0.7 + random.uniform() * 0.1;
    const production = 80 + random.uniform() * 60;
    const heating = temps.reduce((s, t) => s + Math.max(55 - t, 0), 0) / length;
    const cooling = temps.reduce((s, t) => s + Math.max(t - 68, 0), 0) / length;
    const usePerDay =
      250 + 9 * heating + 13 * cooling + 200 * occupied + 1.5 * production + (random.uniform() - 0.5) * 30;
    periods.push(periodOfDays(day, temps, usePerDay, { occupied, production }));
    day += length;
  }
  return periods;
}

describe('the day-resolved form with variables against the plain grid (test/support/day-resolved-grid.ts)', () => {
  const periods = billsWithVariables(41, 36);
  const names = ['occupied', 'production'];
  for (const shape of ['3PC', '3PH', '4P', '5P'] as const) {
    it(`${shape}: the exact search is never worse than a 0.5° grid with a golden-section polish, and its SSE is a refit's`, () => {
      const fit = fitShape(periods, shape, 3, 'daily', names);
      if (!fit.ok) throw new Error(fit.reason);
      const reference = dayResolvedGridSearch(shape, periods, shape === '5P' ? 1 : 0.5, 3, names)!;
      expect(fit.sse).toBeLessThanOrEqual(reference.sse * (1 + 1e-9));
      const refit = dayResolvedSse(shape, periods, fit.changepoints.heating, fit.changepoints.cooling, 3, names);
      expect(fit.sse / refit).toBeCloseTo(1, 9);
    });
  }
  it('without variables the fit is the weather-only one (nothing changes for old callers)', () => {
    const plain = fitShape(periods, '5P', 3, 'daily');
    const none = fitShape(periods, '5P', 3, 'daily', []);
    expect(none).toEqual(plain);
    expect(plain.ok && plain.variables).toBeUndefined();
  });
});

describe('a simulated building with a known occupancy effect (synthetic: the test sets the truth)', () => {
  /** 365 days; use = 400 + 12·(56 − T)₊ + 180·occupied + noise (sd 40), occupied on weekdays. */
  function year(seed: number): Period[] {
    const random = seededRandom(seed);
    return Array.from({ length: 365 }, (_, d) => {
      const temp = Math.round((50 - 22 * Math.cos((2 * Math.PI * d) / 365) + (random.uniform() - 0.5) * 20) * 10) / 10;
      const occupied = d % 7 < 5 ? 1 : 0;
      const noise = 40 * random.normal();
      const use = 400 + 12 * Math.max(56 - temp, 0) + 180 * occupied + noise;
      return periodOfDays(d, [temp], use, { occupied });
    });
  }
  it('recovers the effect within its standard error about as often as it should (40 seeded years)', () => {
    let withinOne = 0;
    let withinThree = 0;
    const runs = 40;
    for (let seed = 1; seed <= runs; seed++) {
      const fit = fitShape(year(seed), '3PH', 3, 'daily', ['occupied']);
      if (!fit.ok) throw new Error(fit.reason);
      const c = fit.coefficients.find((x) => x.name === 'occupied')!;
      const error = Math.abs(c.estimate - 180) / c.standardError;
      if (error <= 1) withinOne++;
      if (error <= 3) withinThree++;
    }
    // A 1-SE band should hold the truth about 68% of the time: 27 of 40 expected; binomial 95% range about 21–33.
    expect(withinOne).toBeGreaterThanOrEqual(20);
    expect(withinOne).toBeLessThanOrEqual(34);
    expect(withinThree).toBe(runs);
  });
});
