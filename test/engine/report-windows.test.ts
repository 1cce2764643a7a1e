import { describe, it, expect } from 'vitest';
import {
  addYears,
  contractYearWindow,
  contractYearsOverlapping,
  inWindowByMidpoint,
  quarterWindow,
  readingMidpoint,
  wholeYearsBetween,
} from '../../src/engine/report-windows.js';
import { daysBetween } from '../../src/engine/dates.js';

// Every expected value is hand-worked from the Gregorian calendar; contracts and bills are invented.

describe('addYears', () => {
  it('moves by calendar years', () => {
    expect(addYears('2024-03-01', 1)).toBe('2025-03-01');
    expect(addYears('2025-12-31', 2)).toBe('2027-12-31');
    expect(addYears('2025-06-15', -3)).toBe('2022-06-15');
    expect(addYears('2025-06-15', 0)).toBe('2025-06-15');
  });

  it('takes Feb 29 to Mar 1 in years without one, and back to Feb 29 in leap years', () => {
    expect(addYears('2024-02-29', 1)).toBe('2025-03-01');
    expect(addYears('2024-02-29', -1)).toBe('2023-03-01');
    expect(addYears('2024-02-29', 4)).toBe('2028-02-29');
    expect(addYears('2024-02-29', 76)).toBe('2100-03-01'); // 2100 is not a leap year (from memory: centuries except every 400th)
    expect(addYears('2024-02-29', -24)).toBe('2000-02-29'); // 2000 is
  });

  it('refuses bad dates, fractional years and years beyond 9999', () => {
    expect(() => addYears('2025-02-29', 1)).toThrow(RangeError);
    expect(() => addYears('2025-01-01', 0.5)).toThrow(/whole number/);
    expect(() => addYears('9999-01-01', 1)).toThrow(RangeError);
  });
});

describe('wholeYearsBetween', () => {
  it('counts anniversaries reached (hand-worked)', () => {
    expect(wholeYearsBetween('2024-03-01', '2024-03-01')).toBe(0);
    expect(wholeYearsBetween('2024-03-01', '2025-02-28')).toBe(0);
    expect(wholeYearsBetween('2024-03-01', '2025-03-01')).toBe(1);
    expect(wholeYearsBetween('2024-02-29', '2025-02-28')).toBe(0);
    expect(wholeYearsBetween('2024-02-29', '2025-03-01')).toBe(1);
    expect(wholeYearsBetween('2024-02-29', '2028-02-28')).toBe(3);
    expect(wholeYearsBetween('2024-02-29', '2028-02-29')).toBe(4);
    expect(wholeYearsBetween('2024-12-31', '2025-12-30')).toBe(0);
  });
});

describe('quarterWindow', () => {
  it('gives the calendar quarter, end exclusive', () => {
    expect(quarterWindow('2026-Q1')).toEqual({ from: '2026-01-01', to: '2026-04-01' });
    expect(quarterWindow('2026-Q2')).toEqual({ from: '2026-04-01', to: '2026-07-01' });
    expect(quarterWindow('2026-Q3')).toEqual({ from: '2026-07-01', to: '2026-10-01' });
    expect(quarterWindow('2026-Q4')).toEqual({ from: '2026-10-01', to: '2027-01-01' });
  });

  it('refuses any other text with a clear message', () => {
    for (const text of ['2026-Q5', '2026-Q0', '2026Q3', '26-Q1', '2026-q3', ' 2026-Q3', '2026-Q3 ', '2026-03', '']) {
      expect(() => quarterWindow(text), JSON.stringify(text)).toThrow(RangeError);
    }
    expect(() => quarterWindow('2026-Q5')).toThrow(
      'not a quarter: "2026-Q5" (expected YYYY-Qn with n from 1 to 4, e.g. 2026-Q3)',
    );
  });
});

describe('contractYearWindow', () => {
  it('covers [start + (N−1) years, start + N years)', () => {
    expect(contractYearWindow('2024-03-01', 5, 1)).toEqual({ from: '2024-03-01', to: '2025-03-01' });
    expect(contractYearWindow('2024-03-01', 5, 5)).toEqual({ from: '2028-03-01', to: '2029-03-01' });
  });

  it('keeps a Feb 29 start contiguous, counting every year from the start (hand-worked lengths: 366, 365, 365, 365, 366)', () => {
    const windows = [1, 2, 3, 4, 5].map((n) => contractYearWindow('2024-02-29', 5, n));
    expect(windows).toEqual([
      { from: '2024-02-29', to: '2025-03-01' },
      { from: '2025-03-01', to: '2026-03-01' },
      { from: '2026-03-01', to: '2027-03-01' },
      { from: '2027-03-01', to: '2028-02-29' },
      { from: '2028-02-29', to: '2029-03-01' },
    ]);
    expect(windows.map((w) => daysBetween(w.from, w.to))).toEqual([366, 365, 365, 365, 366]);
  });

  it('refuses year numbers outside 1 … years, and bad contracts', () => {
    expect(() => contractYearWindow('2024-03-01', 5, 0)).toThrow(RangeError);
    expect(() => contractYearWindow('2024-03-01', 5, 6)).toThrow(/from 1 to 5/);
    expect(() => contractYearWindow('2024-03-01', 5, 1.5)).toThrow(RangeError);
    expect(() => contractYearWindow('2024-03-01', 0, 1)).toThrow(RangeError);
    expect(() => contractYearWindow('2024-3-01', 5, 1)).toThrow(RangeError);
  });
});

describe('contractYearsOverlapping', () => {
  const start = '2024-03-01';

  it('lists the contract years sharing a day with the window', () => {
    expect(contractYearsOverlapping(start, 5, quarterWindow('2025-Q1'))).toEqual([1, 2]); // Jan–Feb in year 1, March in year 2
    expect(contractYearsOverlapping(start, 5, quarterWindow('2025-Q2'))).toEqual([2]);
    expect(contractYearsOverlapping(start, 5, { from: '2020-01-01', to: '2030-01-01' })).toEqual([1, 2, 3, 4, 5]);
  });

  it('respects end-exclusive boundaries', () => {
    expect(contractYearsOverlapping(start, 5, { from: '2025-02-28', to: '2025-03-01' })).toEqual([1]);
    expect(contractYearsOverlapping(start, 5, { from: '2025-03-01', to: '2025-03-02' })).toEqual([2]);
  });

  it('is empty outside the contract', () => {
    expect(contractYearsOverlapping(start, 5, { from: '2023-01-01', to: '2024-03-01' })).toEqual([]);
    expect(contractYearsOverlapping(start, 5, { from: '2029-03-01', to: '2030-01-01' })).toEqual([]);
  });

  it('refuses an empty window', () => {
    expect(() => contractYearsOverlapping(start, 5, { from: '2025-01-01', to: '2025-01-01' })).toThrow(RangeError);
  });
});

describe('readingMidpoint and inWindowByMidpoint', () => {
  it('is start + floor(days / 2) (hand-worked)', () => {
    expect(readingMidpoint('2025-01-01', '2025-02-01')).toBe('2025-01-16'); // 31 days: +15, 15 days either side
    expect(readingMidpoint('2025-01-01', '2025-01-31')).toBe('2025-01-16'); // 30 days: +15
    expect(readingMidpoint('2025-01-01', '2025-01-02')).toBe('2025-01-01'); // 1 day: +0
    expect(readingMidpoint('2024-02-15', '2024-03-15')).toBe('2024-02-29'); // 29 days (leap year): +14
  });

  it('refuses a reading without days', () => {
    expect(() => readingMidpoint('2025-01-02', '2025-01-02')).toThrow(RangeError);
  });

  it('files a bill read on the 2nd–4th in the quarter holding most of its days (hand-worked)', () => {
    // [2025-06-02, 2025-07-02): 30 days, midpoint 06-17; 29 days in Q2, 1 in Q3
    expect(inWindowByMidpoint({ start: '2025-06-02', end: '2025-07-02' }, quarterWindow('2025-Q2'))).toBe(true);
    expect(inWindowByMidpoint({ start: '2025-06-02', end: '2025-07-02' }, quarterWindow('2025-Q3'))).toBe(false);
    // [2025-03-04, 2025-04-03): 30 days, midpoint 03-19 → Q1
    expect(inWindowByMidpoint({ start: '2025-03-04', end: '2025-04-03' }, quarterWindow('2025-Q1'))).toBe(true);
  });

  it('sends an exact half-and-half split to the later window (hand-worked: [03-30, 04-03) is 4 days, midpoint 04-01)', () => {
    expect(inWindowByMidpoint({ start: '2025-03-30', end: '2025-04-03' }, quarterWindow('2025-Q2'))).toBe(true);
    expect(inWindowByMidpoint({ start: '2025-03-30', end: '2025-04-03' }, quarterWindow('2025-Q1'))).toBe(false);
  });

  it('puts every bill of a year in exactly one quarter (synthetic: read dates invented, 2nd–4th of each month)', () => {
    const reads = [
      '2025-01-03',
      '2025-02-04',
      '2025-03-02',
      '2025-04-03',
      '2025-05-02',
      '2025-06-04',
      '2025-07-03',
      '2025-08-02',
      '2025-09-04',
      '2025-10-02',
      '2025-11-03',
      '2025-12-04',
      '2026-01-02',
    ];
    const quarters = ['2025-Q1', '2025-Q2', '2025-Q3', '2025-Q4'].map(quarterWindow);
    const counts = [0, 0, 0, 0];
    for (let i = 0; i + 1 < reads.length; i++) {
      const bill = { start: reads[i]!, end: reads[i + 1]! };
      const holders = quarters.map((q, j) => (inWindowByMidpoint(bill, q) ? j : -1)).filter((j) => j >= 0);
      expect(holders, `${bill.start}..${bill.end}`).toHaveLength(1);
      counts[holders[0]!]! += 1;
    }
    // Each bill starts in the month its midpoint lies in, so three bills a quarter.
    expect(counts).toEqual([3, 3, 3, 3]);
  });
});
