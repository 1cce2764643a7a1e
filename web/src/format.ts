/** Number and date formatting for the screens: fixed, locale-free (the same on every machine and in print). */

/** 1234567.8 → "1,234,568"; decimals as asked; null or non-finite → "—". */
export function num(value: number | null | undefined, decimals = 0): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return '—';
  const fixed = Math.abs(value).toFixed(decimals);
  const [whole, fraction] = fixed.split('.');
  const grouped = whole!.replace(/\B(?=(\d{3})+(?!\d))/g, ',');
  const sign = value < 0 && Number(fixed) !== 0 ? '−' : '';
  return `${sign}${grouped}${fraction ? `.${fraction}` : ''}`;
}

/** A share as a percentage: 0.1234 → "12.3%". */
export function pct(value: number | null | undefined, decimals = 1): string {
  return value === null || value === undefined || !Number.isFinite(value) ? '—' : `${num(value * 100, decimals)}%`;
}

/** Significant figures for statistics and coefficients. */
export function sig(value: number | null | undefined, digits = 4): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return '—';
  if (value === 0) return '0';
  const magnitude = Math.abs(value);
  if (magnitude >= 1e6 || magnitude < 1e-3) return value.toExponential(digits - 1).replace('-', '−');
  const decimals = Math.max(0, digits - 1 - Math.floor(Math.log10(magnitude)));
  return num(value, decimals);
}

export function degree(unit: 'F' | 'C'): string {
  return unit === 'F' ? '°F' : '°C';
}

/** [start, end) in words. */
export function span(start: string, end: string): string {
  return `${start} to ${end} (end exclusive)`;
}
