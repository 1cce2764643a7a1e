import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import { fitShape } from '../../../../src/engine/fit/fit-shape.js';
import { buildBillDays } from '../../../../src/engine/fit/day-resolved/bill-days.js';
import { searchDayResolved } from '../../../../src/engine/fit/day-resolved/search.js';
import { searchFivePoint } from '../../../../src/engine/fit/day-resolved/five-point.js';
import { heatingDegreeDaysPerDay, coolingDegreeDaysPerDay } from '../../../../src/engine/fit/degree-days.js';
import { alignPeriods } from '../../../../src/engine/periods.js';
import type { Period } from '../../../../src/engine/types.js';
import { dayResolvedGridSearch, dayResolvedSse } from '../../../support/day-resolved-grid.js';
import { CLIMATES, dailyWeather, monthlyReadings, seededRandom, type Building } from '../../../support/synthetic.js';

/**
 * The exact day-resolved search against the plain reference in
 * test/support/day-resolved-grid.ts (every changepoint on a 0.25° grid, a
 * refit at each, then a golden-section polish), on invented readings that
 * fast-check generates. Expected relations:
 *   - the exact optimum is never worse than the reference (it is the true
 *     least-squares optimum over the same feasible set): SSE ≤ reference
 *     SSE, to 1e-9 relative;
 *   - the SSE the search reports is the SSE of a direct refit at its
 *     changepoints (to 1e-9 relative);
 *   - noiseless day-resolved data give back their own changepoints
 *     (synthetic: the test sets the truth);
 *   - for one-day readings the day-resolved fit is the mean-form fit.
 */

type Shape = '3PC' | '3PH' | '4P' | '5P';

/** 1e-9 relative is the requirement; the 1e-12·Σwy² floor only matters when the SSE is ~0. */
function tolerance(reference: number, periods: readonly Period[]): number {
  const scale = periods.reduce((a, p) => a + p.days * p.usePerDay * p.usePerDay, 0);
  return 1e-9 * Math.abs(reference) + 1e-12 * scale;
}

function periodFromDays(start: number, temps: number[], usePerDay: number): Period {
  const days = temps.length;
  const date = (offset: number) => new Date(Date.UTC(2030, 0, 1 + offset)).toISOString().slice(0, 10);
  return {
    start: date(start),
    end: date(start + days),
    days,
    quantity: usePerDay * days,
    usePerDay,
    meanTemp: temps.reduce((a, t) => a + t, 0) / days,
    coverage: 1,
    estimated: false,
    dayTemps: temps,
  };
}

/**
 * Invented readings: 7–14 readings of 2–9 days each, daily temperatures on a
 * 0.5° lattice drifting through a season (so neighbouring readings overlap
 * in temperature, as bills do), use per day from a random day-resolved hinge
 * model (slopes of either sign) plus noise, or pure noise.
 */
function readingsArbitrary(): fc.Arbitrary<Period[]> {
  return fc
    .record({
      count: fc.integer({ min: 7, max: 14 }),
      seed: fc.integer({ min: 1, max: 1_000_000 }),
      heating: fc.double({ min: -8, max: 8, noNaN: true }),
      cooling: fc.double({ min: -8, max: 8, noNaN: true }),
      heatingBase: fc.integer({ min: 80, max: 120 }),
      coolingGap: fc.integer({ min: 0, max: 30 }),
      noise: fc.double({ min: 0, max: 20, noNaN: true }),
      pureNoise: fc.boolean(),
    })
    .map(({ count, seed, heating, cooling, heatingBase, coolingGap, noise, pureNoise }) => {
      const random = seededRandom(seed);
      const periods: Period[] = [];
      let day = 0;
      for (let i = 0; i < count; i++) {
        const length = 2 + Math.floor(random.uniform() * 8);
        const centre = 40 + (40 * i) / count; // °F, rising through the readings
        const temps = Array.from({ length }, () => Math.round((centre + 12 * (random.uniform() - 0.5)) * 2) / 2);
        const cH = heatingBase / 2;
        const cC = cH + coolingGap / 2;
        const response = pureNoise
          ? 100
          : 100 + heating * heatingDegreeDaysPerDay(temps, cH) + cooling * coolingDegreeDaysPerDay(temps, cC);
        periods.push(periodFromDays(day, temps, response + noise * random.normal()));
        day += length;
      }
      return periods;
    });
}

function checkAgainstReference(shape: Shape, periods: Period[], minPoints: number): void {
  const fit = fitShape(periods, shape, minPoints, 'daily');
  const reference = dayResolvedGridSearch(shape, periods, 0.25, minPoints);
  if (!fit.ok) {
    // No feasible placement for the exact search: the reference must not find one either.
    expect(reference).toBeNull();
    return;
  }
  const direct = dayResolvedSse(shape, periods, fit.changepoints.heating, fit.changepoints.cooling, minPoints);
  expect(Math.abs(fit.sse - direct)).toBeLessThanOrEqual(tolerance(direct, periods));
  if (reference) expect(fit.sse).toBeLessThanOrEqual(reference.sse + tolerance(reference.sse, periods));
}

describe('exact day-resolved changepoints against a grid-and-polish reference (fast-check)', () => {
  for (const shape of ['3PC', '3PH', '4P'] as const) {
    it(`${shape}: never worse than the reference, and its SSE is the refit's`, () => {
      fc.assert(
        fc.property(readingsArbitrary(), fc.integer({ min: 1, max: 3 }), (periods, minPoints) =>
          checkAgainstReference(shape, periods, minPoints),
        ),
        { numRuns: 40, seed: 20261202 },
      );
    });
  }
  it('5P: never worse than the reference, and its SSE is the refit’s', () => {
    fc.assert(
      fc.property(readingsArbitrary(), fc.integer({ min: 1, max: 3 }), (periods, minPoints) =>
        checkAgainstReference('5P', periods, minPoints),
      ),
      { numRuns: 25, seed: 20261203 },
    );
  });
});

/** 12–40 readings of 1–6 days on a 0.5° lattice through a whole year's temperatures (more breakpoints, optima on edges more often). */
function yearArbitrary(): fc.Arbitrary<Period[]> {
  return fc
    .record({
      count: fc.integer({ min: 12, max: 40 }),
      seed: fc.integer({ min: 1, max: 1_000_000 }),
      heating: fc.double({ min: 0, max: 10, noNaN: true }),
      cooling: fc.double({ min: 0, max: 10, noNaN: true }),
      noise: fc.double({ min: 0.5, max: 40, noNaN: true }),
    })
    .map(({ count, seed, heating, cooling, noise }) => {
      const random = seededRandom(seed);
      const periods: Period[] = [];
      let day = 0;
      for (let i = 0; i < count; i++) {
        const length = 1 + Math.floor(random.uniform() * 6);
        const centre = 55 - 25 * Math.cos((2 * Math.PI * i) / count);
        const temps = Array.from({ length }, () => Math.round((centre + 16 * (random.uniform() - 0.5)) * 2) / 2);
        const response =
          100 + heating * heatingDegreeDaysPerDay(temps, 55) + cooling * coolingDegreeDaysPerDay(temps, 68);
        periods.push(periodFromDays(day, temps, response + noise * random.normal()));
        day += length;
      }
      return periods;
    });
}

/** The pruned search and the one that sweeps every edge agree (synthetic: the optimum is the latter's). */
function checkEdgePruning(periods: Period[], minPoints: number): void {
  const days = buildBillDays(periods);
  const pruned = searchFivePoint(days, minPoints);
  const full = searchFivePoint(days, minPoints, { pruneEdges: false });
  expect(pruned === null).toBe(full === null);
  if (pruned && full) expect(Math.abs(pruned.sse - full.sse)).toBeLessThanOrEqual(tolerance(full.sse, periods));
}

describe('the 5P search’s edge pruning (fast-check)', () => {
  // Each edge is skipped only when its constrained-fit bound cannot beat the best found: the optimum must stay.
  it('gives the same optimum as the search that sweeps every edge', () => {
    fc.assert(fc.property(readingsArbitrary(), fc.integer({ min: 1, max: 3 }), checkEdgePruning), {
      numRuns: 80,
      seed: 20261204,
    });
  });

  it('the same over a year of short readings', () => {
    fc.assert(fc.property(yearArbitrary(), fc.integer({ min: 1, max: 3 }), checkEdgePruning), {
      numRuns: 150,
      seed: 20261205,
    });
  });
});

describe('day-resolved fits of invented buildings', () => {
  /** An invented building answering each day's temperature, billed monthly: the test sets the truth. */
  function bills(building: Building, climate: (typeof CLIMATES)[keyof typeof CLIMATES], seed: number): Period[] {
    const random = seededRandom(seed);
    const weather = dailyWeather(climate, '2030-01-01', 800, random);
    return alignPeriods(monthlyReadings(building, weather, '2030-01-01', 24, random), weather).periods;
  }

  it('recovers the changepoints and slopes of noiseless data exactly (synthetic)', () => {
    const building: Building = {
      base: 20,
      heatingBelow: 58,
      heatingRate: 6,
      coolingAbove: 70,
      coolingRate: 4,
      dailyNoise: 0,
      noisePersistence: 0,
    };
    const periods = bills(building, CLIMATES.temperate, 5);
    const fit = fitShape(periods, '5P', 3, 'daily');
    if (!fit.ok) throw new Error(fit.reason);
    expect(fit.changepoints.heating).toBeCloseTo(58, 6);
    expect(fit.changepoints.cooling).toBeCloseTo(70, 6);
    expect(fit.parameters.base).toBeCloseTo(20, 6);
    expect(fit.parameters.heatingSlope).toBeCloseTo(-6, 6);
    expect(fit.parameters.coolingSlope).toBeCloseTo(4, 6);
    expect(fit.sse).toBeLessThan(1e-12 * periods.reduce((a, p) => a + p.days * p.usePerDay ** 2, 0));
  });

  it('a heating-dominated meter in a mild climate: the day-resolved 3PH recovers 20 / −6 / 58 °F where the mean form cannot (synthetic)', () => {
    const building: Building = {
      base: 20,
      heatingBelow: 58,
      heatingRate: 6,
      coolingAbove: 200,
      coolingRate: 0,
      dailyNoise: 0,
      noisePersistence: 0,
    };
    const periods = bills(building, CLIMATES.mild, 9);
    const daily = fitShape(periods, '3PH', 3, 'daily');
    const mean = fitShape(periods, '3PH', 3, 'mean');
    if (!daily.ok || !mean.ok) throw new Error('3PH not fitted');
    expect(daily.changepoints.heating).toBeCloseTo(58, 6);
    expect(daily.parameters.heatingSlope).toBeCloseTo(-6, 6);
    expect(daily.parameters.base).toBeCloseTo(20, 6);
    // The mean form sees only bill means: its base and slope are pulled away from the truth (model-form error).
    expect(Math.abs(mean.parameters.base! - 20)).toBeGreaterThan(0.5);
    expect(mean.sse).toBeGreaterThan(daily.sse);
  });

  it('for one-day readings the day-resolved fit is the mean-form fit', () => {
    const random = seededRandom(31);
    const weather = dailyWeather(CLIMATES.temperate, '2030-01-01', 400, random);
    const readings = weather.map((d, i) => ({
      start: d.date,
      end: weather[i + 1]?.date ?? '2031-02-05',
      quantity: 300 + 8 * Math.max(55 - d.temp, 0) + 10 * random.normal(),
    }));
    const { periods } = alignPeriods(readings.slice(0, 399), weather);
    for (const shape of ['3PC', '3PH', '4P', '5P'] as const) {
      const daily = fitShape(periods, shape, 3, 'daily');
      const mean = fitShape(periods, shape, 3, 'mean');
      if (!daily.ok || !mean.ok) throw new Error(`${shape} not fitted`);
      expect(daily.changepoints).toEqual(mean.changepoints);
      expect(daily.sse).toBeCloseTo(mean.sse, 9);
    }
  });

  it('finds the same optimum whatever order the readings come in (to rounding)', () => {
    const building: Building = {
      base: 300,
      heatingBelow: 55,
      heatingRate: 8,
      coolingAbove: 68,
      coolingRate: 10,
      dailyNoise: 15,
      noisePersistence: 0.3,
    };
    const periods = bills(building, CLIMATES.temperate, 12);
    const reversed = [...periods].reverse();
    for (const shape of ['3PC', '3PH', '4P', '5P'] as const) {
      const a = searchDayResolved(buildBillDays(periods), shape, 3)!;
      const b = searchDayResolved(buildBillDays(reversed), shape, 3)!;
      // Sums taken in another order round differently, so equal to 1e-9, not bit for bit.
      expect(Math.abs(b.sse - a.sse)).toBeLessThanOrEqual(1e-9 * a.sse);
      if (a.heatingChangepoint !== null) expect(b.heatingChangepoint).toBeCloseTo(a.heatingChangepoint, 6);
      if (a.coolingChangepoint !== null) expect(b.coolingChangepoint).toBeCloseTo(a.coolingChangepoint, 6);
    }
  });
});
