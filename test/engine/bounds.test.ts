/**
 * The input bounds of src/engine/bounds.ts (our own bounds, reasoned in that
 * module) and the checks built on them. Check values: hand-worked
 * arithmetic on the bounds, and synthetic readings whose truth the test sets.
 */
import { describe, expect, it } from 'vitest';
import {
  beyondBound,
  beyondBoundPerDay,
  boundText,
  checkRateBounds,
  checkRateSchedule,
  checkReadings,
  INPUT_BOUNDS,
  MAX_COST_PER_DAY,
  MAX_GUARANTEE_COST,
  MAX_GUARANTEE_ENERGY,
  MAX_PRICE,
  MAX_USE_PER_DAY,
} from '../../src/engine/index.js';

describe('the bounds', () => {
  it('are the documented figures', () => {
    expect(MAX_USE_PER_DAY.max).toBe(1e12);
    expect(MAX_COST_PER_DAY.max).toBe(1e14);
    expect(MAX_PRICE.max).toBe(1e10);
    expect(MAX_GUARANTEE_ENERGY.max).toBe(3.66e14); // hand-worked: 366 days × 1e12
    expect(MAX_GUARANTEE_COST.max).toBe(3.66e16); // hand-worked: 366 days × 1e14
    expect(boundText(3.66e14)).toBe('3.66e14');
  });

  it('keep every sum the ledger forms far below the largest double', () => {
    // hand-worked: the widest ISO span (years 0000 to 9999) is under 3.7e6 days; 1e12 a day over it,
    // times the largest price, is under 3.7e28, about 280 orders of magnitude below 1.8e308.
    const days = 3.7e6;
    expect(MAX_USE_PER_DAY.max * days * MAX_PRICE.max).toBeLessThan(1e29);
    for (const bound of Object.values(INPUT_BOUNDS)) expect(Number.isFinite(bound.max * days * bound.max)).toBe(true);
  });
});

describe('beyondBound and beyondBoundPerDay', () => {
  it('accept the bound itself and refuse the next double above it, naming the bound', () => {
    expect(beyondBound(1e10, MAX_PRICE)).toBeNull();
    expect(beyondBound(-1e10, MAX_PRICE)).toBeNull();
    expect(beyondBound(10_000_000_000.000002, MAX_PRICE)).toMatch(
      /beyond the bound of ±1e10 currency units per unit of the meter/,
    );
    expect(beyondBound(Number.NaN, MAX_PRICE)).toBeNull(); // not finite: another check names it
  });

  it('judge a total by its figure per day, so a long bill at the bound is accepted', () => {
    expect(beyondBoundPerDay(365e12, '2025-01-01', '2026-01-01', MAX_USE_PER_DAY)).toBeNull(); // hand-worked: 365 days × 1e12
    expect(beyondBoundPerDay(366e12, '2025-01-01', '2026-01-01', MAX_USE_PER_DAY)).toMatch(
      /^3\.660e14 over 365 days is 1\.003e12 a day, beyond the bound of 1e12/,
    );
    expect(beyondBoundPerDay(Number.MAX_VALUE, '2025-01-01', '2025-01-02', MAX_USE_PER_DAY)).toMatch(
      /over 1 day is 1\.798e308 a day/,
    );
    expect(beyondBoundPerDay(1e300, '2025-01-02', '2025-01-01', MAX_USE_PER_DAY)).toBeNull(); // end before start: another check names it
  });
});

describe('the checks that use them', () => {
  it('checkReadings refuses a quantity beyond the bound per day, naming the record', () => {
    const readings = [
      { start: '2025-01-01', end: '2025-02-01', quantity: 31e12 }, // synthetic: exactly at the bound
      { start: '2025-02-01', end: '2025-03-01', quantity: 1.7976931348623157e308 },
      { start: '2025-03-01', end: '2025-04-01', quantity: Number.MIN_VALUE },
    ];
    expect(checkReadings(readings)).toEqual([
      { index: 1, field: 'quantity', message: expect.stringMatching(/over 28 days .* beyond the bound of 1e12/) },
    ]);
  });

  it('checkRateBounds refuses a price beyond the bound; the schedule check keeps the escalation range', () => {
    expect(checkRateBounds([{ price: 1e10 }, { price: 2e10 }])).toEqual([
      { index: 1, field: 'price', message: expect.stringMatching(/beyond the bound/) },
    ]);
    const schedule = [{ from: '2025-01-01', to: null, price: 1, escalation: 1.000001 }];
    expect(checkRateSchedule(schedule)).toEqual([
      { index: 0, field: 'escalation', message: expect.stringMatching(/outside the allowed range \(-1, 1\]/) },
    ]);
  });
});
