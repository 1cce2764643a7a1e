/**
 * Report totals. Check values: hand-worked sums, the quadrature rule
 * (√(3² + 4²) = 5), and the brief's standard factors (1 kWh = 3,412.14 Btu,
 * 1 GJ = 947,817 Btu).
 */
import { describe, expect, it } from 'vitest';
import { convertTotal, energyTotal, sumCosts, sumTotals } from '../../src/reports/totals.js';

/** Parts on one station unless said otherwise. */
const on = <T>(total: T, station = 'wst_a') => ({ total, station });
import { mergeRanges } from '../../src/reports/meter-report.js';

const total = (savings: number, uncertainty: number, unit = 'MMBtu') =>
  energyTotal(unit, {
    actual: 100 - savings,
    modelBaseline: 100,
    adjustments: 0,
    adjustedBaseline: 100,
    savings,
    uncertainty,
  });

describe('sumTotals', () => {
  it('adds the figures and combines the ± in quadrature', () => {
    const sum = sumTotals('MMBtu', [on(total(10, 3)), on(total(20, 4))]);
    expect(sum.savings).toBe(30);
    expect(sum.adjustedBaseline).toBe(200);
    expect(sum.uncertainty).toBeCloseTo(5, 12); // hand-worked: √(9 + 16)
    expect(sum.fractionSaved).toBeCloseTo(0.15, 12); // 30 / 200, derived, never summed
  });
  it('combines the ± with the roll-up’s correlation: within a station and across stations (hand-worked)', () => {
    const parts = [on(total(10, 3), 'a'), on(total(20, 4), 'a'), on(total(5, 12), 'b')];
    // 9 + 16 + 144 + 2·0.5·3·4 (within a) + 2·0.25·(3·12 + 4·12) (across) = 169 + 12 + 42 = 223
    expect(
      sumTotals('MMBtu', parts, { correlation: { withinGroup: 0.5, acrossGroups: 0.25 } }).uncertainty,
    ).toBeCloseTo(Math.sqrt(223), 12);
  });
  it('gives zeros and no fraction for nothing', () => {
    expect(sumTotals('GJ', [])).toMatchObject({ savings: 0, uncertainty: 0, fractionSaved: null });
  });
});

describe('convertTotal', () => {
  it('scales every figure, the ± included, by the standard factor', () => {
    const kwh = total(1_000_000, 50_000, 'kWh');
    const mmbtu = convertTotal(kwh, 'MMBtu');
    expect(mmbtu.savings).toBeCloseTo(3412.14, 2); // the brief: 1 kWh = 3,412.14 Btu
    expect(mmbtu.uncertainty).toBeCloseTo(170.607, 3);
    expect(convertTotal(kwh, 'GJ').savings).toBeCloseTo(3600, 9); // SI: 1 kWh = 3.6 MJ exactly
    expect(mmbtu.fractionSaved).toBeCloseTo(kwh.fractionSaved!, 12);
  });
});

describe('sumCosts', () => {
  it('sums per currency in currency order, the ± in quadrature', () => {
    const costs = sumCosts([
      on({ currency: 'USD', avoided: 100, uncertainty: 6, periodsWithoutRate: 1 }),
      on({ currency: 'EUR', avoided: 50, uncertainty: 2, periodsWithoutRate: 0 }),
      on({ currency: 'USD', avoided: 20, uncertainty: 8, periodsWithoutRate: 2 }),
    ]);
    expect(costs).toEqual([
      { currency: 'EUR', avoided: 50, uncertainty: 2, periodsWithoutRate: 0 },
      { currency: 'USD', avoided: 120, uncertainty: 10, periodsWithoutRate: 3 }, // hand-worked: √(36 + 64) = 10
    ]);
  });
});

describe('mergeRanges', () => {
  it('joins touching and overlapping date ranges', () => {
    expect(
      mergeRanges([
        { start: '2025-02-01', end: '2025-03-01' },
        { start: '2025-01-01', end: '2025-02-01' },
        { start: '2025-05-01', end: '2025-06-01' },
        { start: '2025-05-15', end: '2025-05-20' },
      ]),
    ).toEqual([
      { start: '2025-01-01', end: '2025-03-01' },
      { start: '2025-05-01', end: '2025-06-01' },
    ]);
  });
});
