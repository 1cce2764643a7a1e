/**
 * Number formatting for the printed reports: fixed digits, thousands grouped
 * with commas, a true minus sign, and an em dash where there is no value.
 * Hand-rolled so the output never depends on the machine's locale.
 */

/** What a cell shows when it has no value. */
export const NO_VALUE = '—';

/** U+2212, the typographic minus: it lines up with the digits in tables. */
const MINUS = '\u2212';

/**
 * A number with `digits` decimals and grouped thousands, e.g. 1234.567 → "1,234.6"
 * at one digit. Null, undefined and non-finite values give "—"; a value that
 * rounds to zero never shows a minus sign.
 */
export function formatNumber(value: number | null | undefined, digits: number): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return NO_VALUE;
  const fixed = Math.abs(value).toFixed(digits);
  const [whole, fraction] = fixed.split('.');
  const grouped = (whole ?? '0').replace(/\B(?=(\d{3})+(?!\d))/g, ',');
  const negative = value < 0 && /[1-9]/.test(fixed);
  return `${negative ? MINUS : ''}${grouped}${fraction === undefined ? '' : `.${fraction}`}`;
}

/** As formatNumber, with an explicit plus sign on positive values (differences). */
export function formatSigned(value: number | null | undefined, digits: number): string {
  const text = formatNumber(value, digits);
  return value !== null &&
    value !== undefined &&
    Number.isFinite(value) &&
    text !== NO_VALUE &&
    !text.startsWith(MINUS) &&
    /[1-9]/.test(text)
    ? `+${text}`
    : text;
}

/** A fraction as a percentage, e.g. 0.1234 → "12.3%". */
export function formatPercent(fraction: number | null | undefined, digits = 1): string {
  if (fraction === null || fraction === undefined || !Number.isFinite(fraction)) return NO_VALUE;
  return `${formatNumber(fraction * 100, digits)}%`;
}

/** Decimals that suit a column of quantities of this size: 0 from 1,000 up, 1 from 10, else 2. */
export function decimalsFor(values: readonly (number | null)[]): number {
  const largest = Math.max(0, ...values.filter((v): v is number => v !== null && Number.isFinite(v)).map(Math.abs));
  if (largest >= 1000) return 0;
  if (largest >= 10) return 1;
  return 2;
}

/** Decimals for a contract rate: four below 1 (e.g. 0.1425 per kWh), else two. */
export function rateDecimals(rate: number | null): number {
  return rate !== null && Math.abs(rate) < 1 ? 4 : 2;
}
