/**
 * The engine's data failures are typed and carry what callers need.
 * Check values: synthetic inputs whose truth the test sets (readings with no
 * weather are left out; the minimum counts are the engine's own constants).
 */
import { describe, expect, it } from 'vitest';
import {
  alignPeriods,
  analyseBaseline,
  chooseBaseline,
  isUsableSignificanceLevel,
  MIN_BASELINE_PERIODS,
  savingsFromAligned,
  TooFewPeriodsError,
} from '../../src/engine/index.js';
import { CLIMATES, SAMPLE_BUILDING, dailyWeather, monthlyReadings, seededRandom } from '../support/synthetic.js';

const random = seededRandom(3);
const WEATHER = dailyWeather(CLIMATES.temperate, '2023-01-01', 400, random);
const BILLS = monthlyReadings(SAMPLE_BUILDING, WEATHER, '2023-01-01', 12, random);

describe('TooFewPeriodsError', () => {
  it('carries the readings left out of a baseline, so callers need not align again', () => {
    const noWeather = [BILLS[0]!, { start: '2030-01-01', end: '2030-02-01', quantity: 10 }]; // synthetic: no weather for 2030
    const error = (() => {
      try {
        analyseBaseline(noWeather, WEATHER);
      } catch (caught) {
        return caught;
      }
    })() as TooFewPeriodsError;
    expect(error).toBeInstanceOf(TooFewPeriodsError);
    expect(error).not.toBeInstanceOf(RangeError); // RangeError stays for misuse
    expect(error.needed).toBe(MIN_BASELINE_PERIODS);
    expect(error.usable).toBe(1);
    expect(error.excluded.map((p) => p.index)).toEqual([1]);
    expect(error.message).toBe('at least 2 usable periods are needed to fit a baseline, got 1');
  });

  it('is thrown by the choice itself and by a projection with no usable period', () => {
    expect(() => chooseBaseline([])).toThrow(TooFewPeriodsError);
    const fit = analyseBaseline(BILLS, WEATHER).choice.candidates[0]!.fit!;
    const aligned = alignPeriods([{ start: '2030-01-01', end: '2030-02-01', quantity: 10 }], WEATHER);
    expect(() =>
      savingsFromAligned(fit, { limits: { cvrmse: 0.2, nmbe: 0.05 } as never, excluded: [] }, aligned),
    ).toThrow(expect.objectContaining({ purpose: 'savings', usable: 0, excluded: aligned.excluded }));
  });
});

describe('a significance level too small to test at', () => {
  it('is misuse (RangeError) in the engine, and the predicate tells callers beforehand', () => {
    const periods = alignPeriods(BILLS, WEATHER).periods;
    // 1 − 5e-324 === 1 and 1 − 2⁻⁵³ < 1 in IEEE 754 double precision (common practice).
    expect(isUsableSignificanceLevel(5e-324)).toBe(false);
    expect(isUsableSignificanceLevel(2 ** -53)).toBe(true);
    expect(isUsableSignificanceLevel(0.05)).toBe(true);
    expect(isUsableSignificanceLevel(0)).toBe(false);
    expect(isUsableSignificanceLevel(1)).toBe(false);
    expect(() => chooseBaseline(periods, { significanceLevel: 5e-324 })).toThrow(RangeError);
    expect(() => chooseBaseline(periods, { significanceLevel: 2 ** -53 })).not.toThrow();
  });
});
