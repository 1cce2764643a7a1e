import { describe, it, expect } from 'vitest';
import { alignPeriods, DEFAULT_MIN_COVERAGE, indexWeather } from '../../src/engine/periods.js';
import { addDays } from '../../src/engine/dates.js';
import type { DailyTemperature, Reading } from '../../src/engine/types.js';

/**
 * Invented weather and bills; every expected value is hand-worked from the
 * brief's data conventions (x = mean of the daily means over [start, end),
 * y = quantity / days, w = days; coverage threshold 90%, common practice).
 */

/** Weather for `days` days from `start`, each day's temperature given by `temp(d)`. */
function weatherRun(start: string, days: number, temp: (d: number) => number): DailyTemperature[] {
  return Array.from({ length: days }, (_, d) => ({ date: addDays(start, d), temp: temp(d) }));
}

describe('alignPeriods: [start, end) periods against daily weather', () => {
  it('days = end − start; x = mean over the period’s own days; y = quantity / days (hand-worked)', () => {
    // temperatures 1, 2, 3 on Jan 1–3 and 1000 on Jan 4 (the end date, which the period does not cover)
    const weather = [...weatherRun('2030-01-01', 3, (d) => d + 1), { date: '2030-01-04', temp: 1000 }];
    const { periods, excluded } = alignPeriods([{ start: '2030-01-01', end: '2030-01-04', quantity: 300 }], weather);
    expect(excluded).toEqual([]);
    expect(periods).toEqual([
      {
        start: '2030-01-01',
        end: '2030-01-04',
        days: 3,
        quantity: 300,
        usePerDay: 100,
        meanTemp: 2,
        coverage: 1,
        estimated: false,
        dayTemps: [1, 2, 3],
      },
    ]);
  });

  it('consecutive bills sharing a read date each see their own days', () => {
    // Jan: 31 days at 10; Feb (2032 is a leap year): 29 days at 20 — Feb 1 belongs to the February bill only
    const weather = [...weatherRun('2032-01-01', 31, () => 10), ...weatherRun('2032-02-01', 29, () => 20)];
    const readings: Reading[] = [
      { start: '2032-01-01', end: '2032-02-01', quantity: 3100 },
      { start: '2032-02-01', end: '2032-03-01', quantity: 2900, estimated: true },
    ];
    const { periods } = alignPeriods(readings, weather);
    expect(periods.map((p) => [p.days, p.meanTemp, p.usePerDay, p.estimated])).toEqual([
      [31, 10, 100, false],
      [29, 20, 100, true],
    ]);
  });

  it('accepts weather as a Map as well as a list', () => {
    const weather = weatherRun('2030-01-01', 10, (d) => 40 + d);
    const readings = [{ start: '2030-01-01', end: '2030-01-11', quantity: 500 }];
    expect(alignPeriods(readings, indexWeather(weather))).toEqual(alignPeriods(readings, weather));
  });

  it('indexWeather keeps the last value of a repeated date', () => {
    const index = indexWeather([
      { date: '2030-01-01', temp: 1 },
      { date: '2030-01-01', temp: 2 },
    ]);
    expect(index.get('2030-01-01')).toBe(2);
  });
});

describe('coverage rule (common practice: 90% of days by default, not a standard)', () => {
  const bill: Reading = { start: '2030-04-01', end: '2030-05-01', quantity: 3000 }; // 30 days

  /** April weather with the first `missing` days absent; day d has temperature 50 + d. */
  function aprilWithout(missing: number): DailyTemperature[] {
    return weatherRun('2030-04-01', 30, (d) => 50 + d).slice(missing);
  }

  it('the default threshold is 0.9', () => {
    expect(DEFAULT_MIN_COVERAGE).toBe(0.9);
  });

  it('27 of 30 days (exactly 90%) is enough; the mean uses the days present', () => {
    const { periods, excluded } = alignPeriods([bill], aprilWithout(3));
    expect(excluded).toEqual([]);
    expect(periods[0]!.coverage).toBe(0.9);
    // days 3 … 29 present: mean of 53 … 79 = 66 (hand-worked)
    expect(periods[0]!.meanTemp).toBeCloseTo(66, 12);
    // use per day still divides by all 30 days of the bill
    expect(periods[0]!.usePerDay).toBe(100);
  });

  it('26 of 30 days is left out, with the reason stated and the record’s index', () => {
    const { periods, excluded } = alignPeriods([bill], aprilWithout(4));
    expect(periods).toEqual([]);
    expect(excluded).toEqual([
      {
        start: '2030-04-01',
        end: '2030-05-01',
        index: 0,
        reason: 'weather covers 26 of 30 days (86.7% < 90% required)',
      },
    ]);
  });

  it('the threshold is configurable', () => {
    expect(alignPeriods([bill], aprilWithout(4), { minCoverage: 0.5 }).periods).toHaveLength(1);
    const strict = alignPeriods([bill], aprilWithout(1), { minCoverage: 1 });
    expect(strict.periods).toEqual([]);
    expect(strict.excluded[0]!.reason).toBe('weather covers 29 of 30 days (96.7% < 100% required)');
    expect(alignPeriods([bill], aprilWithout(15), { minCoverage: 0.5 }).periods).toHaveLength(1);
    expect(alignPeriods([bill], aprilWithout(16), { minCoverage: 0.5 }).excluded[0]!.reason).toBe(
      'weather covers 14 of 30 days (46.7% < 50% required)',
    );
  });

  it('a period with no weather at all is left out, not divided by zero', () => {
    const { periods, excluded } = alignPeriods([bill], []);
    expect(periods).toEqual([]);
    expect(excluded[0]!.reason).toBe('weather covers 0 of 30 days (0% < 90% required)');
  });

  it('refuses a threshold outside (0, 1]', () => {
    expect(() => alignPeriods([bill], aprilWithout(0), { minCoverage: 0 })).toThrow(RangeError);
    expect(() => alignPeriods([bill], aprilWithout(0), { minCoverage: 1.2 })).toThrow(RangeError);
  });

  it('keeps the input order of the usable periods and reports the input index of the left-out ones', () => {
    const weather = [...weatherRun('2030-01-01', 31, () => 30), ...weatherRun('2030-03-01', 31, () => 45)];
    const readings: Reading[] = [
      { start: '2030-03-01', end: '2030-04-01', quantity: 10 },
      { start: '2030-02-01', end: '2030-03-01', quantity: 20 }, // no February weather
      { start: '2030-01-01', end: '2030-02-01', quantity: 30 },
    ];
    const { periods, excluded } = alignPeriods(readings, weather);
    expect(periods.map((p) => p.start)).toEqual(['2030-03-01', '2030-01-01']);
    expect(excluded.map((e) => [e.index, e.start])).toEqual([[1, '2030-02-01']]);
  });
});
