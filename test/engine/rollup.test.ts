import { describe, it, expect } from 'vitest';
import { combineInQuadrature } from '../../src/engine/rollup.js';

describe('combineInQuadrature', () => {
  it('is sqrt(Σ v²) (hand-worked: sqrt(3² + 4²) = 5; sqrt(1 + 4 + 4) = 3)', () => {
    expect(combineInQuadrature([3, 4])).toBe(5);
    expect(combineInQuadrature([1, 2, 2])).toBe(3);
  });

  it('ignores signs and gives 0 for no parts (hand-worked)', () => {
    expect(combineInQuadrature([-3, 4])).toBe(5);
    expect(combineInQuadrature([])).toBe(0);
    expect(combineInQuadrature([0, 0])).toBe(0);
    expect(combineInQuadrature([7])).toBe(7);
  });

  it('neither overflows nor underflows (hand-worked: 3e200, 4e200 → 5e200; 3e-200, 4e-200 → 5e-200)', () => {
    expect(combineInQuadrature([3e200, 4e200]) / 5e200).toBeCloseTo(1, 14);
    expect(combineInQuadrature([3e-200, 4e-200]) / 5e-200).toBeCloseTo(1, 14);
  });

  it('passes NaN and Infinity through', () => {
    expect(combineInQuadrature([1, Number.NaN])).toBeNaN();
    expect(combineInQuadrature([1, Number.NEGATIVE_INFINITY])).toBe(Number.POSITIVE_INFINITY);
  });
});
