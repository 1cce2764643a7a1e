/**
 * Baseline sufficiency and reporting extrapolation. Check values: the rule's
 * constants are common practice (a full year of bills, 330 days) and a limit
 * of our own (10% of reporting days); every count and share below is
 * hand-worked from the invented periods beside it.
 */
import { describe, expect, it } from 'vitest';
import {
  baselineSufficiency,
  DEFAULT_EXTRAPOLATION_LIMIT,
  MIN_BASELINE_BILLS,
  MIN_BASELINE_DAYS,
  reportingExtrapolation,
} from '../../src/engine/sufficiency.js';
import { alignPeriods, analyseBaseline } from '../../src/engine/index.js';

const days = (...lengths: number[]) => lengths.map((d) => ({ days: d }));

describe('baselineSufficiency', () => {
  it('states the rule: 330 days and, for bills, 12 of them (common practice: a full year of bills)', () => {
    expect(MIN_BASELINE_DAYS).toBe(330);
    expect(MIN_BASELINE_BILLS).toBe(12);
    expect(DEFAULT_EXTRAPOLATION_LIMIT).toBe(0.1); // a limit of our own
  });

  it('accepts a year of monthly bills (hand-worked: the 12 months of 2025 hold 365 days)', () => {
    const result = baselineSufficiency(days(31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31));
    expect(result).toMatchObject({ sufficient: true, reasons: [], periods: 12, days: 365, billed: true });
  });

  it('refuses 11 bills even when they cover 330 days or more (hand-worked: 11 × 31 = 341 days)', () => {
    const result = baselineSufficiency(days(...Array.from({ length: 11 }, () => 31)));
    expect(result.sufficient).toBe(false);
    expect(result.days).toBe(341);
    expect(result.reasons).toHaveLength(1);
    expect(result.reasons[0]).toMatch(
      /^the baseline has 11 usable bills; at least 12 are needed \(common practice: a full year of bills/,
    );
  });

  it('refuses six spring bills on both counts (hand-worked: 31 + 30 + 31 + 30 + 31 + 31 = 184 days)', () => {
    const result = baselineSufficiency(days(31, 30, 31, 30, 31, 31));
    expect(result.sufficient).toBe(false);
    expect(result.reasons).toEqual([
      expect.stringMatching(
        /^the baseline's usable periods cover 184 days; a full cycle of seasons needs at least 330 \(common practice/,
      ),
      expect.stringMatching(/^the baseline has 6 usable bills; at least 12 are needed/),
    ]);
  });

  it('refuses 12 short bills that miss 330 days (hand-worked: 12 × 27 = 324 days)', () => {
    const result = baselineSufficiency(days(...Array.from({ length: 12 }, () => 27)));
    expect(result.sufficient).toBe(false);
    expect(result.reasons).toEqual([expect.stringContaining('cover 324 days')]);
  });

  it('applies only the day count to daily readings: 330 pass, 329 do not', () => {
    expect(baselineSufficiency(days(...Array.from({ length: 330 }, () => 1)))).toMatchObject({
      sufficient: true,
      billed: false,
    });
    const short = baselineSufficiency(days(...Array.from({ length: 329 }, () => 1)));
    expect(short).toMatchObject({ sufficient: false, billed: false });
    expect(short.reasons).toEqual([expect.stringContaining('cover 329 days')]);
  });

  it('counts weekly readings as bills (median of 7 days): 48 weeks pass, 11 weeks fail on both counts', () => {
    expect(baselineSufficiency(days(...Array.from({ length: 48 }, () => 7)))).toMatchObject({
      sufficient: true,
      billed: true,
      days: 336,
    });
    expect(baselineSufficiency(days(...Array.from({ length: 11 }, () => 7))).reasons).toHaveLength(2);
  });

  it('refuses an empty baseline', () => {
    expect(baselineSufficiency([])).toMatchObject({ sufficient: false, days: 0, periods: 0 });
  });
});

describe('reportingExtrapolation', () => {
  const dailyFit = {
    temperatureForm: 'daily' as const,
    temperatureRange: { min: 40, max: 70 },
    dayTemperatureRange: { min: 30, max: 80 },
  };
  const meanFit = {
    temperatureForm: 'mean' as const,
    temperatureRange: { min: 40, max: 70 },
    dayTemperatureRange: null,
  };

  it('counts a day-resolved fit’s reporting days by their own temperatures (hand-worked)', () => {
    // Period 1: days 25, 30, 45, 81 → 25 and 81 are outside 30..80 (30 is on the edge: inside).
    // Period 2: 4 days of 5 have weather: 50, 60, 85, 90 → 2 outside. Share = 4 / 8 = 0.5.
    const reporting = [
      { days: 4, meanTemp: 45.25, dayTemps: [25, 30, 45, 81] },
      { days: 5, meanTemp: 71.25, dayTemps: [50, 60, 85, 90] },
    ];
    const result = reportingExtrapolation(dailyFit, reporting);
    expect(result).toMatchObject({
      share: 0.5,
      outsideDays: 4,
      days: 8,
      basis: 'daily',
      range: { min: 30, max: 80 },
      limit: 0.1,
      exceedsLimit: true,
    });
    expect(result.summary).toMatch(
      /^50\.0% of the reporting days \(4 of 8\) had a daily temperature outside the 30\.0 to 80\.0 the baseline saw day by day; the limit is 10\.0% \(a limit of our own/,
    );
  });

  it('counts a mean-form fit’s reporting days by their period’s mean (hand-worked)', () => {
    // 31 d at 35 (outside 40..70), 30 d at 50, 31 d at 75 (outside), 28 d at 70 (edge: inside): (31 + 31) / 120.
    const reporting = [
      { days: 31, meanTemp: 35, dayTemps: [35] },
      { days: 30, meanTemp: 50 },
      { days: 31, meanTemp: 75 },
      { days: 28, meanTemp: 70 },
    ];
    const result = reportingExtrapolation(meanFit, reporting);
    expect(result).toMatchObject({
      outsideDays: 62,
      days: 120,
      basis: 'mean',
      range: { min: 40, max: 70 },
      exceedsLimit: true,
    });
    expect(result.share).toBeCloseTo(62 / 120, 12);
  });

  it('reads a fit stored before the form existed as a mean-form fit', () => {
    const old = { temperatureRange: { min: 40, max: 70 } } as unknown as typeof meanFit;
    expect(reportingExtrapolation(old, [{ days: 10, meanTemp: 80, dayTemps: [60] }]).basis).toBe('mean');
    expect(reportingExtrapolation(old, [{ days: 10, meanTemp: 80, dayTemps: [60] }]).share).toBe(1);
  });

  it('does not exceed a limit it equals, takes a limit of its own, and refuses a limit outside [0, 1]', () => {
    // 1 day of 10 outside: share 0.1, the default limit exactly.
    const reporting = [{ days: 10, meanTemp: 50, dayTemps: [20, 50, 50, 50, 50, 50, 50, 50, 50, 50] }];
    expect(reportingExtrapolation(dailyFit, reporting)).toMatchObject({ share: 0.1, exceedsLimit: false });
    expect(reportingExtrapolation(dailyFit, reporting, 0.05)).toMatchObject({ limit: 0.05, exceedsLimit: true });
    for (const bad of [-0.1, 1.5, Number.NaN])
      expect(() => reportingExtrapolation(dailyFit, reporting, bad)).toThrow(RangeError);
  });

  it('is zero for no reporting days', () => {
    expect(reportingExtrapolation(dailyFit, [])).toMatchObject({ share: 0, days: 0, exceedsLimit: false });
  });

  it('judges real aligned bills against the daily range of a day-resolved baseline (synthetic: the test sets the weather)', () => {
    // A year of daily weather running 20 → 84.8 (°F), then a reporting month of 31 days at 10 °F, colder than any baseline day.
    const weather = Array.from({ length: 365 }, (_, d) => ({
      date: new Date(Date.UTC(2024, 0, 1 + d)).toISOString().slice(0, 10),
      temp: 20 + (d % 325) / 5,
    }));
    const readings = Array.from({ length: 12 }, (_, m) => ({
      start: new Date(Date.UTC(2024, m, 1)).toISOString().slice(0, 10),
      end: new Date(Date.UTC(2024, m + 1, 1)).toISOString().slice(0, 10),
      quantity: 3000 + 100 * m,
    }));
    const baseline = analyseBaseline(readings, weather);
    const fit = baseline.choice.candidates.find((c) => c.model === baseline.choice.selected)!.fit!;
    expect(fit.temperatureForm).toBe('daily');
    const cold = Array.from({ length: 31 }, (_, d) => ({
      date: `2025-01-${String(d + 1).padStart(2, '0')}`,
      temp: 10,
    }));
    const { periods } = alignPeriods([{ start: '2025-01-01', end: '2025-02-01', quantity: 5000 }], cold);
    expect(reportingExtrapolation(fit, periods)).toMatchObject({
      share: 1,
      outsideDays: 31,
      days: 31,
      basis: 'daily',
      range: { min: 20, max: 84.8 },
    });
  });
});
