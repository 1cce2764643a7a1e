/**
 * Number formatting of the printed reports. Check values are hand-worked
 * (the arithmetic is in each comment); rounding follows Number.prototype.toFixed
 * (ECMAScript: the nearer of the two candidates, the larger on a tie).
 */
import { describe, it, expect } from 'vitest';
import {
  decimalsFor,
  formatNumber,
  formatPercent,
  formatSigned,
  NO_VALUE,
  rateDecimals,
} from '../../src/reports/format.js';

const MINUS = '\u2212';

describe('formatNumber', () => {
  it('groups thousands and fixes the decimals', () => {
    expect(formatNumber(1234.5678, 1)).toBe('1,234.6'); // hand-worked: 1234.5678 → 1234.6, comma before the hundreds
    expect(formatNumber(1234567.891, 2)).toBe('1,234,567.89'); // hand-worked
    expect(formatNumber(999.95, 1)).toBe('1,000.0'); // hand-worked: 999.95 rounds up into a new group
    expect(formatNumber(12, 0)).toBe('12'); // hand-worked: no decimal point at zero digits
    expect(formatNumber(0.125, 2)).toBe('0.13'); // hand-worked: 0.125 is exact in binary, the tie goes to the larger
  });

  it('writes negatives with a true minus sign and never a negative zero', () => {
    expect(formatNumber(-1234567.891, 2)).toBe(`${MINUS}1,234,567.89`); // hand-worked
    expect(formatNumber(-0.04, 1)).toBe('0.0'); // hand-worked: rounds to zero, so no sign
    expect(formatNumber(-0, 0)).toBe('0'); // hand-worked
  });

  it('shows an em dash for no value', () => {
    expect(formatNumber(null, 1)).toBe(NO_VALUE); // common practice: a dash for an empty cell
    expect(formatNumber(undefined, 1)).toBe('—');
    expect(formatNumber(Number.NaN, 1)).toBe('—');
    expect(formatNumber(Number.POSITIVE_INFINITY, 1)).toBe('—');
  });

  it('is independent of the machine locale', () => {
    // hand-worked: a locale-aware formatter would give "1.234,6" in many European locales.
    expect(formatNumber(1234.56, 1)).toBe(
      (1234.56).toLocaleString('en-US', { minimumFractionDigits: 1, maximumFractionDigits: 1 }),
    );
  });
});

describe('formatSigned, formatPercent', () => {
  it('puts a plus on positive differences only', () => {
    expect(formatSigned(70.94, 1)).toBe('+70.9'); // hand-worked
    expect(formatSigned(-925.88, 1)).toBe(`${MINUS}925.9`); // hand-worked
    expect(formatSigned(0.01, 1)).toBe('0.0'); // hand-worked: rounds to zero, no sign
    expect(formatSigned(null, 1)).toBe('—');
  });

  it('shows fractions as percentages', () => {
    expect(formatPercent(0.1234)).toBe('12.3%'); // hand-worked: 0.1234 × 100 = 12.34
    expect(formatPercent(0.9, 0)).toBe('90%'); // hand-worked
    expect(formatPercent(null)).toBe('—');
  });
});

describe('decimal choices', () => {
  it('uses fewer decimals for larger quantities', () => {
    expect(decimalsFor([12.5, 1500])).toBe(0); // hand-worked: largest ≥ 1,000
    expect(decimalsFor([-12.5, 3])).toBe(1); // hand-worked: largest magnitude 12.5 ≥ 10
    expect(decimalsFor([3, null])).toBe(2); // hand-worked: largest 3 < 10
    expect(decimalsFor([])).toBe(2); // hand-worked: nothing to size
  });

  it('gives rates below one four decimals', () => {
    expect(rateDecimals(0.1425)).toBe(4); // common practice: electricity rates per kWh carry four decimals
    expect(rateDecimals(1.05)).toBe(2); // common practice: rates per therm or MMBtu carry cents
    expect(rateDecimals(null)).toBe(2);
  });
});
