/**
 * The chart axes over the whole range of doubles. A finite but extreme
 * value (near Number.MAX_VALUE) once rounded an axis end up to Infinity and
 * the tick loop never ended; subnormal spans made the step zero. Properties
 * (common practice for chart axes; the bounds are the module's own): for
 * any inputs, finite or not, every axis and tick function returns, with at
 * most MAX_TICKS ticks, a finite domain min < max, finite ticks inside it,
 * finite positions for every tick and for the data's ends, and labels that
 * never read NaN or Infinity; every chart drawn from such data is
 * well-formed and holds no non-finite token. Inputs come from fast-check
 * with a fixed seed, plus the named extremes every run.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import {
  axisFraction,
  axisScale,
  finiteExtent,
  MAX_TICKS,
  tickLabel,
  type AxisScale,
} from '../../../src/reports/svg/ticks.js';
import { dateTicks, MAX_DATE_TICKS } from '../../../src/reports/svg/date-axis.js';
import { coord } from '../../../src/reports/svg/xml.js';
import { renderSignatureSvg } from '../../../src/reports/svg/signature.js';
import { renderPeriodComparisonSvg } from '../../../src/reports/svg/period-comparison.js';
import { renderCumulativeSavingsSvg } from '../../../src/reports/svg/cumulative-savings.js';
import { nonFiniteTokens, wellFormedProblems } from './xml-checks.js';

const SEED = 17_2026;
const MAX = Number.MAX_VALUE;
const SUBNORMAL = Number.MIN_VALUE; // 5e-324, the smallest positive double
const SMALLEST_NORMAL = 2.2250738585072014e-308;

/** The doubles that break naive axis code, named so every run tries them. */
const EXTREMES = [
  0,
  -0,
  1,
  -1,
  MAX,
  -MAX,
  MAX / 2,
  -MAX / 2,
  SUBNORMAL,
  -SUBNORMAL,
  2 * SUBNORMAL,
  SMALLEST_NORMAL,
  -SMALLEST_NORMAL,
  1e308,
  1e-308,
  1e21,
  1e17,
  1e17 + 32,
  2 ** 53,
  0.1,
  1e-10,
  NaN,
  Infinity,
  -Infinity,
];

/** Any double: the whole range (subnormals, ±MAX_VALUE, ±0, NaN and ±Infinity included) weighted toward the extremes. */
const anyDouble = fc.oneof(fc.double(), fc.constantFrom(...EXTREMES), fc.double({ min: -1e6, max: 1e6, noNaN: true }));

function checkScale(scale: AxisScale, low: number, high: number): void {
  expect(Number.isFinite(scale.min) && Number.isFinite(scale.max), `domain ${scale.min}..${scale.max}`).toBe(true);
  expect(scale.max).toBeGreaterThan(scale.min);
  expect(scale.ticks.length).toBeGreaterThanOrEqual(2);
  expect(scale.ticks.length).toBeLessThanOrEqual(MAX_TICKS);
  for (const tick of scale.ticks) {
    expect(Number.isFinite(tick), `tick ${tick}`).toBe(true);
    const at = axisFraction(scale, tick);
    // A tick may sit a rounding error outside the domain, never further.
    expect(at).toBeGreaterThanOrEqual(-1e-6);
    expect(at).toBeLessThanOrEqual(1 + 1e-6);
    expect(tickLabel(tick, scale.decimals)).not.toMatch(/NaN|Infinity|undefined/);
  }
  for (const end of [low, high]) {
    if (!Number.isFinite(end)) continue;
    const at = axisFraction(scale, end);
    expect(Number.isFinite(at)).toBe(true);
    expect(at).toBeGreaterThanOrEqual(-1e-6);
    expect(at).toBeLessThanOrEqual(1 + 1e-6);
  }
}

describe('axisScale over the whole double range', () => {
  it('keeps the hand-worked round axes of ordinary data', () => {
    expect(axisScale(31.2, 88.9)).toMatchObject({
      min: 20,
      max: 100,
      step: 20,
      ticks: [20, 40, 60, 80, 100],
      decimals: 0,
    }); // hand-worked
    expect(axisScale(0, 2.4)).toMatchObject({
      min: 0,
      max: 2.5,
      step: 0.5,
      ticks: [0, 0.5, 1, 1.5, 2, 2.5],
      decimals: 1,
    }); // hand-worked: 2.4/5 = 0.48 → 0.5
    expect(axisScale(0, 11)).toMatchObject({ step: 2.5, ticks: [0, 2.5, 5, 7.5, 10, 12.5], decimals: 1 }); // hand-worked: 11/5 = 2.2 → 2.5
  });

  it('gives a bounded, finite axis for every pair of named extremes', () => {
    for (const a of EXTREMES) {
      for (const b of EXTREMES) checkScale(axisScale(a, b), a, b);
    }
  });

  it('gives a bounded, finite axis for any two doubles and any tick target', () => {
    fc.assert(
      fc.property(
        anyDouble,
        anyDouble,
        fc.oneof(fc.constant(6), fc.integer({ min: -5, max: 1000 }), fc.double()),
        (a, b, target) => {
          checkScale(axisScale(a, b, target), a, b);
        },
      ),
      { seed: SEED, numRuns: 1500 },
    );
  });

  it('writes labels for values no fixed-point label can hold', () => {
    expect(tickLabel(MAX, 0)).toBe('1.80e+308'); // hand-worked: 1.797…e308 to three figures
    expect(tickLabel(-1e20, 0)).toBe('-1.00e+20');
    expect(tickLabel(2.5e-20, 21)).toBe('2.50e-20');
    expect(tickLabel(12500, 0)).toBe('12,500'); // hand-worked: unchanged for ordinary values
    expect(tickLabel(NaN, 2)).toBe('n/a');
  });

  it('finds the finite extent of a list too long to spread into Math.min', () => {
    const values = Array.from({ length: 300_000 }, (_, i) => (i === 5 ? NaN : i === 7 ? Infinity : i)); // synthetic
    expect(finiteExtent(values)).toEqual({ min: 0, max: 299_999 });
    expect(finiteExtent([NaN, -Infinity])).toBeNull();
  });

  it('writes every coordinate as a finite decimal', () => {
    fc.assert(
      fc.property(anyDouble, (value) => {
        expect(coord(value)).toMatch(/^-?\d+(\.\d+)?$/);
      }),
      { seed: SEED, numRuns: 2000 },
    );
  });
});

describe('dateTicks over the whole double range', () => {
  it('gives at most MAX_DATE_TICKS month starts inside the span, for any two doubles', () => {
    fc.assert(
      fc.property(
        anyDouble,
        anyDouble,
        fc.oneof(fc.constant(7), fc.integer({ min: -5, max: 1000 }), fc.double()),
        (start, end, target) => {
          const ticks = dateTicks(start, end, target);
          expect(ticks.length).toBeLessThanOrEqual(MAX_DATE_TICKS);
          for (const tick of ticks) {
            expect(Number.isInteger(tick.day)).toBe(true);
            expect(tick.day).toBeGreaterThanOrEqual(start);
            expect(tick.day).toBeLessThanOrEqual(end);
            expect(tick.label).toMatch(/^[A-Z][a-z]{2}( \d{4})?$/);
          }
        },
      ),
      { seed: SEED, numRuns: 1500 },
    );
  });

  it('spans the widest ISO dates (0000 to 9999) with a handful of ticks', () => {
    const ticks = dateTicks(-719_528, 2_932_896); // day numbers of 0000-01-01 and 9999-12-31 (hand-worked from the civil-day formula)
    expect(ticks.length).toBeGreaterThanOrEqual(2);
    expect(ticks.length).toBeLessThanOrEqual(MAX_DATE_TICKS);
  });
});

describe('charts drawn from extreme data', () => {
  const values = fc.array(anyDouble, { minLength: 0, maxLength: 8 });

  it('draws the energy signature, well-formed and without a non-finite token, for any values', () => {
    const point = fc.record({ temp: anyDouble, usePerDay: anyDouble });
    fc.assert(
      fc.property(
        fc.array(point, { maxLength: 8 }),
        fc.array(point, { maxLength: 4 }),
        fc.array(point, { maxLength: 8 }),
        (baseline, fittedLine, reporting) => {
          const svg = renderSignatureSvg({
            meterName: 'Extreme meter (synthetic)',
            model: '3PH',
            version: 1,
            status: 'frozen',
            baselineStart: '2024-01-01',
            baselineEnd: '2025-01-01',
            temperatureUnit: 'F',
            useUnit: 'kWh',
            baseline,
            fittedLine,
            reporting,
          });
          expect(wellFormedProblems(svg)).toEqual([]);
          expect(nonFiniteTokens(svg)).toEqual([]);
        },
      ),
      { seed: SEED, numRuns: 250 },
    );
  });

  it('draws the period comparison and the cumulative savings for any values', () => {
    fc.assert(
      fc.property(values, values, anyDouble, anyDouble, (actual, baseline, guaranteed, uncertainty) => {
        const periods = actual.map((value, i) => ({
          start: `2025-${String((i % 12) + 1).padStart(2, '0')}-01`,
          end: `2025-${String((i % 12) + 1).padStart(2, '0')}-28`,
          actual: value,
          adjustedBaseline: baseline[i] ?? 0,
          outsideBaselineRange: i % 3 === 0,
        }));
        const comparison = renderPeriodComparisonSvg({ title: 'Extreme periods (synthetic)', unit: 'kWh', periods });
        expect(wellFormedProblems(comparison)).toEqual([]);
        expect(nonFiniteTokens(comparison)).toEqual([]);
        const cumulative = renderCumulativeSavingsSvg({
          title: 'Extreme savings (synthetic)',
          unit: 'kWh',
          yearStart: '2025-01-01',
          yearEnd: '2026-01-01',
          guaranteed,
          uncertainty,
          points: periods.map((p) => ({ end: p.end, value: p.actual })),
        });
        expect(wellFormedProblems(cumulative)).toEqual([]);
        expect(nonFiniteTokens(cumulative)).toEqual([]);
      }),
      { seed: SEED, numRuns: 250 },
    );
  });
});
