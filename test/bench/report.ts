/**
 * Plain-text layout of the benchmark figures: aligned tables, and a target
 * line that says PASS or MISS (a miss is reported, never thrown).
 */
export function table(
  headers: readonly string[],
  rows: readonly (readonly string[])[],
  rightAligned: readonly boolean[] = [],
): string {
  const widths = headers.map((h, j) => Math.max(h.length, ...rows.map((row) => (row[j] ?? '').length)));
  const line = (cells: readonly string[]): string =>
    cells
      .map((cell, j) => (rightAligned[j] ? cell.padStart(widths[j]!) : cell.padEnd(widths[j]!)))
      .join('  ')
      .trimEnd();
  const rule = widths.map((w) => '-'.repeat(w)).join('  ');
  return [line(headers), rule, ...rows.map(line)].map((l) => `  ${l}`).join('\n');
}

export interface TargetResult {
  name: string;
  target: string;
  measured: string;
  pass: boolean;
  /** e.g. "grid time partly estimated". */
  caveat?: string;
}

export function verdict(pass: boolean): 'PASS' | 'MISS' {
  return pass ? 'PASS' : 'MISS';
}

export function targetLine(result: TargetResult): string {
  const caveat = result.caveat ? ` (${result.caveat})` : '';
  return `  target ${result.target}: measured ${result.measured} -> ${verdict(result.pass)}${caveat}`;
}

/** Milliseconds with three significant-ish decimals for small values. */
export function ms(value: number): string {
  if (!Number.isFinite(value)) return String(value);
  if (value >= 1000) return `${(value / 1000).toFixed(2)} s`;
  if (value >= 100) return `${value.toFixed(0)} ms`;
  if (value >= 10) return `${value.toFixed(1)} ms`;
  return `${value.toFixed(3)} ms`;
}

export function times(ratio: number): string {
  return ratio >= 100 ? `${Math.round(ratio).toLocaleString('en-US')}×` : `${ratio.toFixed(1)}×`;
}

export function sse(value: number): string {
  return value.toLocaleString('en-US', { minimumFractionDigits: 1, maximumFractionDigits: 1 });
}

export function temperature(value: number | null): string {
  return value === null ? '–' : value.toFixed(2);
}

export function changepoints(values: readonly (number | null)[]): string {
  const present = values.filter((v): v is number => v !== null);
  // 4P carries the same changepoint in both slots: show it once.
  const shown = present.length === 2 && present[0] === present[1] ? [present[0]!] : present;
  return shown.map(temperature).join(' / ') || '–';
}

export function count(value: number): string {
  return value.toLocaleString('en-US');
}

/** Round for the JSON record so it stays small and readable. */
export function round(value: number, digits = 4): number {
  if (!Number.isFinite(value)) return value;
  return Number(value.toPrecision(digits));
}
