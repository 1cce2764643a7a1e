import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import { fitShape, searchView } from '../../../../src/engine/fit/fit-shape.js';
import { searchFivePointWithBasis } from '../../../../src/engine/fit/day-resolved/five-point-basis.js';
import { dayResolvedGridSearch, dayResolvedSse } from '../../../support/day-resolved-grid.js';
import { periodOfDays, seededRandom } from '../../../support/synthetic.js';
import type { Period, TemperatureForm } from '../../../../src/engine/types.js';

/**
 * The 5P search with extra columns (independent variables, day types) on
 * invented readings that fast-check generates, in both forms and for
 * one-day readings. Expected relations (synthetic: the truth is the
 * least-squares optimum over the same feasible set):
 *   - pruning the edges by the rectangles' constrained free fits never
 *     changes the optimum: the same SSE as the search that sweeps every
 *     admitted edge, to 1e-9 relative;
 *   - the SSE it reports is the SSE of a direct refit at its changepoints;
 *   - it is never worse than a 1° grid with a golden-section polish
 *     (test/support/day-resolved-grid.ts).
 */

const NAMES = ['occupied', 'output'];

/** 10–18 readings of 1 day (daily meters) or 2–9 days, two invented variables, use from a random 5P plus noise. */
function readingsArbitrary(): fc.Arbitrary<Period[]> {
  return fc
    .record({
      count: fc.integer({ min: 10, max: 18 }),
      oneDay: fc.boolean(),
      seed: fc.integer({ min: 1, max: 1_000_000 }),
      heating: fc.double({ min: 0, max: 8, noNaN: true }),
      cooling: fc.double({ min: 0, max: 8, noNaN: true }),
      effect: fc.double({ min: -60, max: 60, noNaN: true }),
      noise: fc.double({ min: 0.5, max: 25, noNaN: true }),
    })
    .map(({ count, oneDay, seed, heating, cooling, effect, noise }) => {
      const random = seededRandom(seed);
      const periods: Period[] = [];
      let day = 0;
      for (let i = 0; i < count; i++) {
        const length = oneDay ? 1 : 2 + Math.floor(random.uniform() * 8);
        const centre = 35 + (50 * i) / count;
        const temps = Array.from({ length }, () => Math.round((centre + 14 * (random.uniform() - 0.5)) * 2) / 2);
        const occupied = random.uniform() < 0.3 ? 0 : 1;
        const output = Math.round(random.uniform() * 40);
        const hdd = temps.reduce((a, t) => a + Math.max(52 - t, 0), 0) / length;
        const cdd = temps.reduce((a, t) => a + Math.max(t - 66, 0), 0) / length;
        const use = 100 + heating * hdd + cooling * cdd + effect * occupied + 0.8 * output + noise * random.normal();
        periods.push(periodOfDays(day, temps, use, { occupied, output }, '2031-01-01'));
        day += length;
      }
      return periods;
    });
}

function scale(periods: readonly Period[]): number {
  return periods.reduce((a, p) => a + p.days * p.usePerDay * p.usePerDay, 0);
}

describe('the 5P search with extra columns (fast-check)', () => {
  for (const form of ['daily', 'mean'] as const satisfies readonly TemperatureForm[]) {
    it(`${form} form: edge pruning keeps the optimum of the search that sweeps every edge`, () => {
      fc.assert(
        fc.property(readingsArbitrary(), fc.integer({ min: 1, max: 3 }), (periods, k) => {
          const view = searchView(periods, form, NAMES);
          const pruned = searchFivePointWithBasis(view, k);
          const full = searchFivePointWithBasis(view, k, { pruneEdges: false });
          expect(pruned === null).toBe(full === null);
          if (pruned && full)
            expect(Math.abs(pruned.sse - full.sse)).toBeLessThanOrEqual(1e-9 * full.sse + 1e-12 * scale(periods));
        }),
        { numRuns: 60, seed: 20261204 },
      );
    });
  }

  it('daily form: its SSE is a refit’s and never worse than a 1° grid with a polish', () => {
    fc.assert(
      fc.property(readingsArbitrary(), (periods) => {
        const fit = fitShape(periods, '5P', 2, 'daily', NAMES);
        const reference = dayResolvedGridSearch('5P', periods, 1, 2, NAMES);
        if (!fit.ok) {
          expect(reference).toBeNull();
          return;
        }
        const refit = dayResolvedSse('5P', periods, fit.changepoints.heating, fit.changepoints.cooling, 2, NAMES);
        expect(Math.abs(fit.sse - refit)).toBeLessThanOrEqual(1e-9 * refit + 1e-12 * scale(periods));
        if (reference)
          expect(fit.sse).toBeLessThanOrEqual(reference.sse + 1e-9 * reference.sse + 1e-12 * scale(periods));
      }),
      { numRuns: 15, seed: 20261205 },
    );
  });
});
