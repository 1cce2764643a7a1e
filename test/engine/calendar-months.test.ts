import { describe, expect, it } from 'vitest';
import { calendarMonths, cvrmseLimitForReportingMonths } from '../../src/engine/index.js';

// Check values: hand-worked from the Gregorian calendar (each day counts 1/(days of its month)).
// The CV(RMSE) limits are the module's own (from memory, see guideline14.ts).

describe('a 365-day reporting year was counted as 11.99 months and judged by the under-12-month limit', () => {
  it('counts a calendar year of 365 days as exactly 12 months', () => {
    expect(calendarMonths([{ start: '2025-01-01', end: '2026-01-01' }])).toBe(12); // hand-worked: 12 whole months
    expect(cvrmseLimitForReportingMonths(calendarMonths([{ start: '2025-01-01', end: '2026-01-01' }]))).toBe(0.25);
  });

  it('counts a leap calendar year of 366 days as exactly 12 months', () => {
    expect(calendarMonths([{ start: '2024-01-01', end: '2025-01-01' }])).toBe(12); // hand-worked
  });

  it('counts 364 days as under 12 months, judged by the stricter limit', () => {
    const months = calendarMonths([{ start: '2025-01-01', end: '2025-12-31' }]);
    expect(months).toBeCloseTo(11 + 30 / 31, 14); // hand-worked: December has 30 of its 31 days
    expect(cvrmseLimitForReportingMonths(months)).toBe(0.2);
  });

  it('counts 366 days of a year without 29 February as just over 12 months', () => {
    expect(calendarMonths([{ start: '2025-01-01', end: '2026-01-02' }])).toBeCloseTo(12 + 1 / 31, 14); // hand-worked
  });

  it('counts a year of monthly bills read mid-month (an anniversary to an anniversary) as exactly 12', () => {
    const bills = [
      '2025-03-15',
      '2025-04-14',
      '2025-05-16',
      '2025-06-13',
      '2025-07-15',
      '2025-08-14',
      '2025-09-15',
      '2025-10-15',
      '2025-11-14',
      '2025-12-15',
      '2026-01-15',
      '2026-02-13',
      '2026-03-15',
    ];
    const periods = bills.slice(0, -1).map((start, i) => ({ start, end: bills[i + 1]! }));
    expect(calendarMonths(periods)).toBe(12); // hand-worked: March's 17 + 14 days make one 31-day month
  });

  it('counts a single calendar month as 1 and a gap between bills as nothing', () => {
    expect(calendarMonths([{ start: '2024-02-01', end: '2024-03-01' }])).toBe(1); // hand-worked: 29 of 29 days
    expect(
      calendarMonths([
        { start: '2025-01-01', end: '2025-02-01' },
        { start: '2025-04-01', end: '2025-05-01' },
      ]),
    ).toBe(2); // hand-worked: February and March not covered
  });
});
