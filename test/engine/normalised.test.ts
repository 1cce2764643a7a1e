/**
 * Normalised savings: both models over a normal year. Check values:
 * synthetic, the test sets the truth (an invented building whose measures
 * take exactly 30 units a day off its base load, everything else equal, so
 * the typical-year saving is 30 × 365 = 10,950, hand-worked), and the
 * project's own 330-day rule (common practice, stated in normalised.ts).
 */
import { describe, expect, it } from 'vitest';
import {
  analyseBaseline,
  MIN_NORMALISED_REPORTING_DAYS,
  NORMAL_YEAR_DAYS,
  normalisedSavings,
  normalYearMonths,
  predictPerDay,
} from '../../src/engine/index.js';
import {
  CLIMATES,
  SAMPLE_BUILDING,
  dailyReadings,
  dailyWeather,
  monthlyReadings,
  seededRandom,
} from '../support/synthetic.js';

const random = seededRandom(77);
const WEATHER = dailyWeather(CLIMATES.temperate, '2023-01-01', 1096, random);
const BASELINE = dailyReadings(SAMPLE_BUILDING, WEATHER.slice(0, 731), random);
const REPORTING = dailyReadings({ ...SAMPLE_BUILDING, base: SAMPLE_BUILDING.base - 30 }, WEATHER.slice(731), random);
const FIT = (() => {
  const analysis = analyseBaseline(BASELINE, WEATHER);
  return analysis.choice.candidates.find((c) => c.model === analysis.choice.selected)!.fit!;
})();
/** A smooth typical year of the same invented climate, inside the weather both models saw. */
const NORMAL = NORMAL_YEAR_DAYS.map((_, i) => 58 - 20 * Math.cos((2 * Math.PI * (i - 18)) / 365));

describe('normalisedSavings', () => {
  it('recovers the saving the test built in, over the normal year', () => {
    const result = normalisedSavings(FIT, REPORTING, WEATHER, NORMAL);
    if (!result.available) throw new Error(result.reason);
    expect(result.savings).toBeGreaterThan(10_950 * 0.95); // synthetic truth 10,950, within 5% for noise
    expect(result.savings).toBeLessThan(10_950 * 1.05);
    expect(result.baselineUse - result.reportingUse).toBeCloseTo(result.savings, 9);
    expect(result.fractionSaved).toBeCloseTo(result.savings / result.baselineUse, 12);
    expect(result.reportingPeriods).toBe(365);
    expect(result.outsideRangeShare).toBe(0);
  });

  it('says why it is not available when the reporting readings span less than a full cycle of seasons', () => {
    const short = REPORTING.slice(0, MIN_NORMALISED_REPORTING_DAYS - 1);
    expect(normalisedSavings(FIT, short, WEATHER, NORMAL)).toEqual({
      available: false,
      reason: `the window holds ${MIN_NORMALISED_REPORTING_DAYS - 1} days of usable reporting periods; a reporting-period model needs at least ${MIN_NORMALISED_REPORTING_DAYS} (a full cycle of seasons)`,
    });
  });

  it('counts normal-year days outside either model’s temperature range', () => {
    const hot = NORMAL.map((t, i) => (i < 73 ? 150 : t)); // 73 of 365 days above any temperature seen: a share of 0.2 (hand-worked)
    const result = normalisedSavings(FIT, REPORTING, WEATHER, hot);
    if (!result.available) throw new Error(result.reason);
    expect(result.outsideRangeShare).toBeCloseTo(0.2, 12);
  });
});

describe('normalisedSavings on bills', () => {
  it('applies the normal year as calendar months to mean-form models fitted on bills', () => {
    const random = seededRandom(78);
    const weather = dailyWeather(CLIMATES.temperate, '2023-01-01', 1096, random);
    const bills = monthlyReadings(SAMPLE_BUILDING, weather, '2023-01-01', 24, random);
    const reporting = monthlyReadings(
      { ...SAMPLE_BUILDING, base: SAMPLE_BUILDING.base - 30 },
      weather,
      '2025-01-01',
      12,
      random,
    );
    const analysis = analyseBaseline(bills, weather, { temperatureForm: 'mean' });
    const fit = analysis.choice.candidates.find((c) => c.model === analysis.choice.selected)!.fit!;
    const result = normalisedSavings(fit, reporting, weather, NORMAL);
    if (!result.available) throw new Error(result.reason);
    expect(result.normalYearAs).toBe('months');
    // hand-worked definition: Σ over the 12 months of days × f(the month's mean temperature)
    const months = normalYearMonths(NORMAL);
    expect(months.map((m) => m.days)).toEqual([31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31]);
    expect(months[0]!.meanTemp).toBeCloseTo(NORMAL.slice(0, 31).reduce((a, t) => a + t, 0) / 31, 12);
    const byHand = months.reduce(
      (sum, m) => sum + m.days * predictPerDay(fit.model, fit.changepoints, fit.rawCoefficients, m.meanTemp),
      0,
    );
    expect(result.baselineUse).toBeCloseTo(byHand, 6);
  });

  it('applies the normal year day by day to day-resolved models fitted on bills (the default)', () => {
    const random = seededRandom(78);
    const weather = dailyWeather(CLIMATES.temperate, '2023-01-01', 1096, random);
    const bills = monthlyReadings(SAMPLE_BUILDING, weather, '2023-01-01', 24, random);
    const reporting = monthlyReadings(
      { ...SAMPLE_BUILDING, base: SAMPLE_BUILDING.base - 30 },
      weather,
      '2025-01-01',
      12,
      random,
    );
    const analysis = analyseBaseline(bills, weather);
    expect(analysis.document.temperatureForm).toBe('daily');
    const fit = analysis.choice.candidates.find((c) => c.model === analysis.choice.selected)!.fit!;
    const result = normalisedSavings(fit, reporting, weather, NORMAL);
    if (!result.available) throw new Error(result.reason);
    expect(result.normalYearAs).toBe('days');
    // hand-worked definition: Σ over the 365 days of f(the day's temperature)
    const byHand = NORMAL.reduce(
      (sum, t) => sum + predictPerDay(fit.model, fit.changepoints, fit.rawCoefficients, t),
      0,
    );
    expect(result.baselineUse).toBeCloseTo(byHand, 6);
    // synthetic: the building's base fell by 30 per day, so a typical year saves about 30 × 365 (noise allows a few per cent)
    expect(result.savings / (30 * 365)).toBeGreaterThan(0.9);
    expect(result.savings / (30 * 365)).toBeLessThan(1.1);
  });

  it('applies it day by day to daily readings', () => {
    const result = normalisedSavings(FIT, REPORTING, WEATHER, NORMAL);
    expect(result.available && result.normalYearAs).toBe('days');
  });
});
