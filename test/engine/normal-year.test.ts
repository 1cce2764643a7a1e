import { describe, it, expect } from 'vitest';
import { NORMAL_YEAR_DAYS, checkNormalYear, normalYearUse } from '../../src/engine/normal-year.js';

// Synthetic normal years: the test sets the temperatures and the model, so it sets the truth.

function fullYear(temp = 55): { day: string; temp: number }[] {
  return NORMAL_YEAR_DAYS.map((day) => ({ day, temp }));
}

describe('NORMAL_YEAR_DAYS', () => {
  it('holds the 365 days of a year without 02-29, in order (hand-worked: index 59 = 31 days of January + 28 of February → 03-01)', () => {
    expect(NORMAL_YEAR_DAYS).toHaveLength(365);
    expect(NORMAL_YEAR_DAYS[0]).toBe('01-01');
    expect(NORMAL_YEAR_DAYS[58]).toBe('02-28');
    expect(NORMAL_YEAR_DAYS[59]).toBe('03-01');
    expect(NORMAL_YEAR_DAYS[364]).toBe('12-31');
    expect(NORMAL_YEAR_DAYS).not.toContain('02-29');
    expect(new Set(NORMAL_YEAR_DAYS).size).toBe(365);
    expect([...NORMAL_YEAR_DAYS].sort()).toEqual(NORMAL_YEAR_DAYS);
    expect(Object.isFrozen(NORMAL_YEAR_DAYS)).toBe(true);
  });
});

describe('checkNormalYear', () => {
  it('accepts every day once, in any order', () => {
    expect(checkNormalYear(fullYear(), 'F')).toEqual([]);
    expect(checkNormalYear([...fullYear(12)].reverse(), 'C')).toEqual([]);
  });

  it('names the missing days', () => {
    const year = fullYear().filter((d) => d.day !== '03-14' && d.day !== '03-15');
    expect(checkNormalYear(year, 'F')).toEqual([
      {
        index: -1,
        field: 'day',
        message: 'missing days: 03-14, 03-15 (a normal year has all 365 days, 02-29 left out)',
      },
    ]);
  });

  it('lists up to 10 missing days, then how many more (hand-worked: 12 missing → 10 named and 2 more)', () => {
    const year = fullYear().slice(12); // drops 01-01 … 01-12
    const [problem] = checkNormalYear(year, 'F');
    expect(problem!.message).toBe(
      'missing days: 01-01, 01-02, 01-03, 01-04, 01-05, 01-06, 01-07, 01-08, 01-09, 01-10 and 2 more (a normal year has all 365 days, 02-29 left out)',
    );
    expect(checkNormalYear([], 'F')[0]!.message).toMatch(/and 355 more/); // 365 − 10
  });

  it('refuses 02-29 with the reason', () => {
    const problems = checkNormalYear([...fullYear(), { day: '02-29', temp: 30 }], 'F');
    expect(problems).toEqual([
      {
        index: 365,
        field: 'day',
        message: '02-29 is not a day of a normal year: a normal year has 365 days and 02-29 is left out',
      },
    ]);
  });

  it('refuses days that do not exist or are not MM-DD', () => {
    const problems = checkNormalYear(
      [...fullYear(), { day: '13-01', temp: 30 }, { day: '2025-01-01', temp: 30 }, { day: '04-31', temp: 30 }],
      'F',
    );
    expect(problems.map((p) => p.index)).toEqual([365, 366, 367]);
    expect(problems[0]!.message).toBe(
      'not a day of a normal year: "13-01" (expected MM-DD; a normal year has 365 days and 02-29 is left out)',
    );
  });

  it('refuses a repeated day, pointing at the first', () => {
    const problems = checkNormalYear([...fullYear(), { day: '07-04', temp: 80 }], 'F');
    expect(problems).toEqual([
      {
        index: 365,
        field: 'day',
        message: 'repeats the day 07-04: a normal year has each of its 365 days exactly once',
        relatedIndex: 184,
      },
    ]);
  });

  it('refuses implausible and non-finite temperatures (units.ts bound: −80 °F to 140 °F, hand-worked −62.2 °C to 60 °C)', () => {
    const year = fullYear();
    year[0] = { day: '01-01', temp: 150 };
    year[1] = { day: '01-02', temp: Number.NaN };
    expect(checkNormalYear(year, 'F')).toEqual([
      { index: 0, field: 'temp', message: '150 °F is outside the plausible range -80…140 °F' },
      { index: 1, field: 'temp', message: 'not a finite number' },
    ]);
    const celsius = fullYear(10);
    celsius[2] = { day: '01-03', temp: -70 };
    expect(checkNormalYear(celsius, 'C')).toEqual([
      { index: 2, field: 'temp', message: '-70 °C is outside the plausible range -62.2…60 °C' },
    ]);
  });
});

describe('normalYearUse', () => {
  it('sums a 3PH model over the days and counts days outside the fitted range (hand-worked)', () => {
    // 3PH: y = 100 + 2·(60 − x)₊ per day (raw hinge coefficient +2, i.e. heating slope −2 per degree).
    const fit = {
      model: '3PH' as const,
      changepoints: { heating: 60, cooling: null },
      rawCoefficients: [100, 2],
      temperatureRange: { min: 45, max: 75 },
    };
    // 100 days at 40 °F, 165 days at 70 °F, 100 days at 50 °F: 365 days.
    const temps = [...Array<number>(100).fill(40), ...Array<number>(165).fill(70), ...Array<number>(100).fill(50)];
    // 100 × (100 + 2 × 20) + 165 × 100 + 100 × (100 + 2 × 10) = 14,000 + 16,500 + 12,000 = 42,500;
    // the 100 days at 40 °F are below the fitted minimum of 45 °F.
    expect(normalYearUse(fit, temps)).toEqual({ use: 42_500, outsideRangeDays: 100 });
  });

  it('sums a 2P model over a ramp of temperatures (hand-worked)', () => {
    // y = 10 + 0.5·x; day i has x = i / 10 for i = 0 … 364.
    // Σ = 365 × 10 + 0.5 × Σ i/10 = 3,650 + 0.05 × (364 × 365 / 2 = 66,430) = 3,650 + 3,321.5 = 6,971.5.
    // Range 0 … 30: days with i/10 > 30 are i = 301 … 364, 64 days.
    const fit = {
      model: '2P' as const,
      changepoints: { heating: null, cooling: null },
      rawCoefficients: [10, 0.5],
      temperatureRange: { min: 0, max: 30 },
    };
    const temps = Array.from({ length: 365 }, (_, i) => i / 10);
    const result = normalYearUse(fit, temps);
    expect(result.use).toBeCloseTo(6971.5, 9);
    expect(result.outsideRangeDays).toBe(64);
  });

  it('counts the range bounds as inside', () => {
    const fit = {
      model: '1P' as const,
      changepoints: { heating: null, cooling: null },
      rawCoefficients: [3],
      temperatureRange: { min: 10, max: 20 },
    };
    // hand-worked: 3 days × 3 = 9; 10 and 20 are on the bounds, 9.9 and 20.1 outside
    expect(normalYearUse(fit, [10, 20, 15])).toEqual({ use: 9, outsideRangeDays: 0 });
    expect(normalYearUse(fit, [9.9, 20.1])).toEqual({ use: 6, outsideRangeDays: 2 });
  });
});
