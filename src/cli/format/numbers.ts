/**
 * Number formatting for the plain-text reports: fixed decimals, thousands
 * grouped with commas, independent of the machine's locale. Non-finite
 * values print as "n/a".
 */

export const NOT_AVAILABLE = 'n/a';

export function formatFixed(value: number | null | undefined, decimals: number): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return NOT_AVAILABLE;
  const text = value.toFixed(decimals);
  const negative = text.startsWith('-') && Number(text) !== 0;
  const [whole, fraction] = text.replace(/^-/, '').split('.');
  const grouped = (whole ?? '').replace(/\B(?=(\d{3})+(?!\d))/g, ',');
  return `${negative ? '-' : ''}${grouped}${fraction !== undefined ? `.${fraction}` : ''}`;
}

/** A fraction as a percentage, e.g. 0.1234 → "12.3%". */
export function formatPercent(fraction: number | null | undefined, decimals = 1): string {
  if (fraction === null || fraction === undefined || !Number.isFinite(fraction)) return NOT_AVAILABLE;
  return `${formatFixed(fraction * 100, decimals)}%`;
}

/** A parameter at four significant digits, without exponent for everyday magnitudes. */
export function formatSignificant(value: number | null | undefined, digits = 4): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return NOT_AVAILABLE;
  const magnitude = Math.abs(value);
  if (magnitude !== 0 && (magnitude >= 1e7 || magnitude < 1e-3)) return value.toExponential(digits - 1);
  const decimals = magnitude === 0 ? 0 : Math.max(0, digits - 1 - Math.floor(Math.log10(magnitude)));
  return formatFixed(value, decimals);
}

/** Decimals that suit a column of energy quantities of this size. */
export function quantityDecimals(values: readonly number[]): number {
  const largest = Math.max(0, ...values.filter(Number.isFinite).map(Math.abs));
  if (largest >= 1000) return 0;
  if (largest >= 10) return 1;
  return 2;
}
