/**
 * Small summaries for the calibration tables: a mean with its standard
 * error, a share, and percent text.
 */

/** Mean and its standard error (sample sd / √n); NaN for fewer than 2 values. */
export function meanWithError(values: readonly number[]): { mean: number; standardError: number } {
  const n = values.length;
  if (n === 0) return { mean: Number.NaN, standardError: Number.NaN };
  const mean = values.reduce((total, v) => total + v, 0) / n;
  if (n < 2) return { mean, standardError: Number.NaN };
  const variance = values.reduce((total, v) => total + (v - mean) ** 2, 0) / (n - 1);
  return { mean, standardError: Math.sqrt(variance / n) };
}

/** Share of items for which `test` holds (NaN for none). */
export function share<T>(items: readonly T[], test: (item: T) => boolean): number {
  if (items.length === 0) return Number.NaN;
  return items.filter(test).length / items.length;
}

/** Largest magnitude (0 for none). */
export function maxAbs(values: readonly number[]): number {
  return values.reduce((largest, v) => Math.max(largest, Math.abs(v)), 0);
}

/** Root mean square (NaN for none). */
export function rms(values: readonly number[]): number {
  if (values.length === 0) return Number.NaN;
  return Math.sqrt(values.reduce((total, v) => total + v * v, 0) / values.length);
}

/** A fraction as percent text with the given decimals ("12.3%"). */
export function percent(fraction: number, decimals = 1): string {
  return Number.isFinite(fraction) ? `${(fraction * 100).toFixed(decimals)}%` : '–';
}

/** A signed fraction as percent text ("+0.12%", "−1.05%"). */
export function signedPercent(fraction: number, decimals = 2): string {
  if (!Number.isFinite(fraction)) return '–';
  const text = (Math.abs(fraction) * 100).toFixed(decimals);
  return `${fraction < 0 && Number(text) !== 0 ? '−' : '+'}${text}%`;
}

/** Sample correlation of two equally long series (NaN when either is constant). */
export function correlation(a: readonly number[], b: readonly number[]): number {
  const n = Math.min(a.length, b.length);
  let ma = 0;
  let mb = 0;
  for (let i = 0; i < n; i++) {
    ma += a[i]!;
    mb += b[i]!;
  }
  ma /= n;
  mb /= n;
  let sab = 0;
  let saa = 0;
  let sbb = 0;
  for (let i = 0; i < n; i++) {
    const da = a[i]! - ma;
    const db = b[i]! - mb;
    sab += da * db;
    saa += da * da;
    sbb += db * db;
  }
  return sab / Math.sqrt(saa * sbb);
}

/**
 * Probability that the share of successes in n trials of probability p
 * falls outside [min, max]: how often a group of n meters misses a coverage
 * range by chance alone when the band's true coverage is p (exact binomial).
 */
export function binomialShareOutside(n: number, p: number, min: number, max: number): number {
  let inside = 0;
  let logChoose = 0; // ln C(n, k), built up term by term
  for (let k = 0; k <= n; k++) {
    if (k > 0) logChoose += Math.log(n - k + 1) - Math.log(k);
    const share = k / n;
    if (share >= min && share <= max) inside += Math.exp(logChoose + k * Math.log(p) + (n - k) * Math.log(1 - p));
  }
  return 1 - inside;
}
