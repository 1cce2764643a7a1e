import { describe, it, expect } from 'vitest';
import {
  adjustmentOverlap,
  adjustmentPerDay,
  adjustmentsForPeriod,
  adjustmentsUncertaintyInPeriods,
  adjustmentUncertaintyInPeriods,
  findOverlappingAdjustment,
  type NonRoutineAdjustment,
} from '../../src/engine/adjustments.js';
import { InvalidAdjustmentError } from '../../src/engine/errors.js';

// Invented adjustments; every expected value is hand-worked (arithmetic beside it).

function adjustment(
  fields: Partial<NonRoutineAdjustment> & Pick<NonRoutineAdjustment, 'start' | 'end'>,
): NonRoutineAdjustment {
  return { id: 'a1', quantity: null, perDay: null, reason: 'east wing closed for refurbishment', ...fields };
}

describe('adjustmentPerDay', () => {
  it('spreads a quantity evenly over the days of [start, end) (hand-worked: 3,000 / 30 days of April 2025 = 100 a day)', () => {
    expect(adjustmentPerDay(adjustment({ start: '2025-04-01', end: '2025-05-01', quantity: 3000 }))).toBe(100);
  });

  it('returns perDay as given (hand-worked: −45.5 a day)', () => {
    expect(adjustmentPerDay(adjustment({ start: '2025-04-01', end: '2025-04-02', perDay: -45.5 }))).toBe(-45.5);
  });

  it('counts a leap day (hand-worked: 2024-02-01..2024-03-01 is 29 days; 580 / 29 = 20)', () => {
    expect(adjustmentPerDay(adjustment({ start: '2024-02-01', end: '2024-03-01', quantity: 580 }))).toBe(20);
  });

  it('refuses both or neither amount, a non-finite amount, and end ≤ start', () => {
    expect(() =>
      adjustmentPerDay(adjustment({ start: '2025-04-01', end: '2025-05-01', quantity: 1, perDay: 1 })),
    ).toThrow(/exactly one/);
    expect(() => adjustmentPerDay(adjustment({ start: '2025-04-01', end: '2025-05-01' }))).toThrow(/exactly one/);
    expect(() =>
      adjustmentPerDay(adjustment({ start: '2025-04-01', end: '2025-05-01', quantity: Number.NaN })),
    ).toThrow(InvalidAdjustmentError);
    expect(() => adjustmentPerDay(adjustment({ start: '2025-04-01', end: '2025-04-01', quantity: 10 }))).toThrow(
      /not after/,
    );
    expect(() => adjustmentPerDay(adjustment({ start: '2025-04-31', end: '2025-05-01', quantity: 10 }))).toThrow(
      InvalidAdjustmentError,
    );
  });
});

describe('adjustmentOverlap', () => {
  it('counts days in common of two [start, end) spans (hand-worked)', () => {
    // [04-10, 05-10) ∩ [04-01, 05-01) = [04-10, 05-01): 21 days
    expect(
      adjustmentOverlap({ start: '2025-04-10', end: '2025-05-10' }, { start: '2025-04-01', end: '2025-05-01' }),
    ).toBe(21);
    // one inside the other: [04-05, 04-08) inside April: 3 days
    expect(
      adjustmentOverlap({ start: '2025-04-05', end: '2025-04-08' }, { start: '2025-04-01', end: '2025-05-01' }),
    ).toBe(3);
  });

  it('is 0 for spans that only touch (end exclusive) or are apart', () => {
    expect(
      adjustmentOverlap({ start: '2025-04-01', end: '2025-05-01' }, { start: '2025-05-01', end: '2025-06-01' }),
    ).toBe(0);
    expect(
      adjustmentOverlap({ start: '2025-04-01', end: '2025-05-01' }, { start: '2025-07-01', end: '2025-08-01' }),
    ).toBe(0);
  });
});

describe('adjustmentsForPeriod', () => {
  const closure = adjustment({ id: 'closure', start: '2025-04-10', end: '2025-05-10', quantity: 3000 }); // 30 days → 100 a day
  const newLine = adjustment({ id: 'line', start: '2025-04-20', end: '2025-06-01', perDay: -25 });

  it('sums perDay × days in common (hand-worked)', () => {
    // April 2025 bill [04-01, 05-01): closure 21 days × 100 = 2,100; new line [04-20, 05-01) 11 days × −25 = −275; total 1,825
    expect(adjustmentsForPeriod([closure, newLine], '2025-04-01', '2025-05-01')).toBe(1825);
    // May 2025 bill [05-01, 06-01): closure 9 days × 100 = 900; new line 31 days × −25 = −775; total 125
    expect(adjustmentsForPeriod([closure, newLine], '2025-05-01', '2025-06-01')).toBe(125);
    // June: neither applies
    expect(adjustmentsForPeriod([closure, newLine], '2025-06-01', '2025-07-01')).toBe(0);
  });

  it('gives back exactly the quantity for a period holding the whole adjustment (hand-worked: 100 spread over 3 days, all in the period)', () => {
    const thirds = adjustment({ start: '2025-04-01', end: '2025-04-04', quantity: 100 });
    expect(adjustmentsForPeriod([thirds], '2025-03-15', '2025-04-15')).toBe(100);
    // one day of three: 100 × 1 / 3
    expect(adjustmentsForPeriod([thirds], '2025-04-03', '2025-04-15')).toBeCloseTo(100 / 3, 12);
  });

  it('adds up to the whole quantity over consecutive periods sharing read dates (hand-worked: 2,100 + 900 = 3,000)', () => {
    const total =
      adjustmentsForPeriod([closure], '2025-04-01', '2025-05-01') +
      adjustmentsForPeriod([closure], '2025-05-01', '2025-06-01');
    expect(total).toBe(3000);
  });

  it('is 0 for no adjustments', () => {
    expect(adjustmentsForPeriod([], '2025-04-01', '2025-05-01')).toBe(0);
  });
});

describe('findOverlappingAdjustment', () => {
  const existing = [
    { id: 'x', start: '2025-01-01', end: '2025-02-01' },
    { id: 'y', start: '2025-03-01', end: '2025-04-01' },
  ];

  it('finds the first existing span sharing a day with the candidate', () => {
    expect(findOverlappingAdjustment(existing, { start: '2025-03-31', end: '2025-05-01' })?.id).toBe('y');
    expect(findOverlappingAdjustment(existing, { start: '2024-12-01', end: '2025-06-01' })?.id).toBe('x');
  });

  it('is undefined when the candidate only touches or fills a gap', () => {
    expect(findOverlappingAdjustment(existing, { start: '2025-02-01', end: '2025-03-01' })).toBeUndefined();
    expect(findOverlappingAdjustment([], { start: '2025-02-01', end: '2025-03-01' })).toBeUndefined();
  });
});

describe('the uncertainty an adjustment carries into the reporting periods', () => {
  // The closure: 3,000 over [04-10, 05-10), 30 days, ± 600 (one standard deviation of the total, stated by the engineer).
  const closure = adjustment({
    id: 'closure',
    start: '2025-04-10',
    end: '2025-05-10',
    quantity: 3000,
    uncertainty: 600,
  });
  // The new line: −25 a day over [04-20, 06-01), 42 days, ± 800 on its total of −1,050.
  const newLine = adjustment({ id: 'line', start: '2025-04-20', end: '2025-06-01', perDay: -25, uncertainty: 800 });
  const april = { start: '2025-04-01', end: '2025-05-01' };
  const may = { start: '2025-05-01', end: '2025-06-01' };

  it('is the share of its days inside the periods times its stated ± (hand-worked)', () => {
    expect(adjustmentUncertaintyInPeriods(closure, [april])).toBeCloseTo((600 * 21) / 30, 12); // 21 of 30 days: 420
    expect(adjustmentUncertaintyInPeriods(closure, [may])).toBeCloseTo((600 * 9) / 30, 12); // 9 of 30 days: 180
    // One error shared by its days: the parts add linearly back to the whole (420 + 180 = 600), not in quadrature.
    expect(adjustmentUncertaintyInPeriods(closure, [april, may])).toBeCloseTo(600, 12);
    expect(adjustmentUncertaintyInPeriods(newLine, [april])).toBeCloseTo((800 * 11) / 42, 12); // 11 of 42 days
  });

  it('combines different adjustments in quadrature (hand-worked: √(600² + 800²) = 1,000 over April and May)', () => {
    expect(adjustmentsUncertaintyInPeriods([closure, newLine], [april, may])).toBeCloseTo(1000, 9);
  });

  it('is 0 for an adjustment without a stated ±, outside the periods, or for none', () => {
    expect(
      adjustmentUncertaintyInPeriods(adjustment({ start: '2025-04-10', end: '2025-05-10', quantity: 3000 }), [april]),
    ).toBe(0);
    expect(
      adjustmentUncertaintyInPeriods(
        adjustment({ start: '2025-04-10', end: '2025-05-10', quantity: 3000, uncertainty: null }),
        [april],
      ),
    ).toBe(0);
    expect(adjustmentUncertaintyInPeriods(closure, [{ start: '2025-07-01', end: '2025-08-01' }])).toBe(0);
    expect(adjustmentsUncertaintyInPeriods([], [april])).toBe(0);
  });

  it('refuses a negative or non-finite ±', () => {
    expect(() => adjustmentUncertaintyInPeriods({ ...closure, uncertainty: -1 }, [april])).toThrow(
      /uncertainty must be a finite number of at least 0/,
    );
    expect(() =>
      adjustmentUncertaintyInPeriods({ ...closure, uncertainty: Number.POSITIVE_INFINITY }, [april]),
    ).toThrow(InvalidAdjustmentError);
  });
});
