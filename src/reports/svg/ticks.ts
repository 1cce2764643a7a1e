/**
 * Axis ticks at round values: the step is 1, 2, 2.5 or 5 times a power of
 * ten, chosen so that about `target` ticks span the data (the usual
 * round-number rule of chart axes, common practice).
 */

export interface AxisScale {
  /** Domain start and end, widened to whole steps. */
  min: number;
  max: number;
  step: number;
  ticks: number[];
  /** Decimals that show every tick exactly. */
  decimals: number;
}

const STEP_MULTIPLIERS = [1, 2, 2.5, 5, 10];

export function axisScale(dataMin: number, dataMax: number, target = 6): AxisScale {
  let low = Number.isFinite(dataMin) ? dataMin : 0;
  let high = Number.isFinite(dataMax) ? dataMax : 1;
  if (high < low) [low, high] = [high, low];
  if (high === low) {
    const pad = Math.abs(low) > 0 ? Math.abs(low) * 0.1 : 1;
    low -= pad;
    high += pad;
  }
  const rough = (high - low) / Math.max(1, target - 1);
  const power = 10 ** Math.floor(Math.log10(rough));
  const step = STEP_MULTIPLIERS.map((m) => m * power).find((s) => s >= rough) ?? 10 * power;
  const min = Math.floor(low / step + 1e-9) * step;
  const max = Math.ceil(high / step - 1e-9) * step;
  const decimals = decimalsOf(step);
  const ticks: number[] = [];
  for (let i = 0; min + i * step <= max + step * 1e-9; i++) ticks.push(Number((min + i * step).toFixed(decimals)));
  return { min, max, step, ticks, decimals };
}

function decimalsOf(step: number): number {
  for (let d = 0; d <= 10; d++) if (Math.abs(Math.round(step * 10 ** d) - step * 10 ** d) < 1e-6) return d;
  return 10;
}

/** A tick label: fixed decimals, thousands grouped with commas, and never "-0". */
export function tickLabel(value: number, decimals: number): string {
  const fixed = (Object.is(value, -0) || Math.abs(value) < 10 ** -(decimals + 1) ? 0 : value).toFixed(decimals);
  const [whole, fraction] = fixed.split('.');
  const grouped = whole!.replace(/\B(?=(\d{3})+(?!\d))/g, ',');
  return fraction === undefined ? grouped : `${grouped}.${fraction}`;
}
