/**
 * Axis ticks at round values: the step is 1, 2, 2.5 or 5 times a power of
 * ten, chosen so that about `target` ticks span the data (the usual
 * round-number rule of chart axes, common practice).
 *
 * Every finite input gives a usable axis in bounded time: the tick count is
 * capped at MAX_TICKS, no difference or product is formed that could round
 * to Infinity (near ±Number.MAX_VALUE) or to zero (among subnormals), and
 * an axis whose round numbers cannot be formed falls back to evenly spaced
 * ticks between the data's ends. Non-finite inputs are ignored.
 */

export interface AxisScale {
  /** Domain start and end, widened to whole steps (both finite, min < max). */
  min: number;
  max: number;
  step: number;
  ticks: number[];
  /** Decimals that show every tick exactly; above MAX_FIXED_DECIMALS labels use scientific notation. */
  decimals: number;
}

/** The most ticks any axis gets, whatever its data. */
export const MAX_TICKS = 25;
/** Beyond this many decimals, or from LARGEST_FIXED_LABEL up, a label is written as 1.23e-15 / 4.56e+20. */
const MAX_FIXED_DECIMALS = 12;
const LARGEST_FIXED_LABEL = 1e15;
const STEP_MULTIPLIERS = [1, 2, 2.5, 5, 10] as const;

/** The axis for data in [dataMin, dataMax] (either order), with about `target` ticks. */
export function axisScale(dataMin: number, dataMax: number, target = 6): AxisScale {
  const wanted = Number.isFinite(target) ? Math.min(Math.max(Math.round(target), 3), MAX_TICKS) : 6;
  let low = Number.isFinite(dataMin) ? dataMin : 0;
  let high = Number.isFinite(dataMax) ? dataMax : 1;
  if (high < low) [low, high] = [high, low];
  if (!(high > low)) {
    const pad = Math.abs(low) * 0.1;
    low = Math.max(low - pad, -Number.MAX_VALUE);
    high = Math.min(high + pad, Number.MAX_VALUE);
    // Zero, or so small that a tenth of it underflows: a unit either side.
    if (!(high > low)) [low, high] = [low - 1, high + 1];
  }
  return roundScale(low, high, wanted) ?? evenScale(low, high, wanted);
}

/** Round-number ticks, or null when they cannot be formed in floating point. */
function roundScale(low: number, high: number, wanted: number): AxisScale | null {
  const intervals = wanted - 1;
  // Divided before subtracting, so the span of ±MAX_VALUE does not overflow.
  const rough = high / intervals - low / intervals;
  if (!(rough > 0) || !Number.isFinite(rough)) return null;
  const exponent = Math.floor(Math.log10(rough));
  const power = 10 ** exponent;
  if (!(power > 0) || !Number.isFinite(power)) return null;
  const multiplier = STEP_MULTIPLIERS.find((m) => m * power >= rough) ?? 10;
  const step = multiplier * power;
  if (!Number.isFinite(step)) return null;
  const min = Math.floor(low / step + 1e-9) * step;
  const max = Math.ceil(high / step - 1e-9) * step;
  if (!Number.isFinite(min) || !Number.isFinite(max) || !(max > min)) return null;
  const count = Math.round(max / step - min / step);
  if (!Number.isFinite(count) || count < 1 || count >= MAX_TICKS) return null;
  const decimals = Math.max(0, -exponent + (multiplier === 2.5 ? 1 : 0) - (multiplier === 10 ? 1 : 0));
  const ticks: number[] = [];
  const first = Math.round(min / step);
  for (let i = 0; i <= count; i++) {
    // (k + i)·step rather than min + i·step: i·step alone can overflow near ±MAX_VALUE.
    const raw = i === count ? max : (first + i) * step;
    // toFixed removes float noise (0.30000000000000004) where it can without moving a tick.
    ticks.push(decimals <= MAX_FIXED_DECIMALS && Math.abs(raw) < 1e21 ? Number(raw.toFixed(decimals)) : raw);
  }
  return { min, max, step, ticks, decimals };
}

/** `wanted` evenly spaced ticks from low to high: for spans round numbers cannot cover. */
function evenScale(low: number, high: number, wanted: number): AxisScale {
  const intervals = wanted - 1;
  const ticks: number[] = [];
  // low·(1 − f) + high·f never overflows where (high − low) would.
  for (let i = 0; i <= intervals; i++)
    ticks.push(i === intervals ? high : low * (1 - i / intervals) + high * (i / intervals));
  return { min: low, max: high, step: high / intervals - low / intervals, ticks, decimals: MAX_FIXED_DECIMALS + 1 };
}

/**
 * Where `value` lies on the axis as a fraction of it (0 at min, 1 at max),
 * without overflow; held to [−1, 2] so a stray value still gives a finite
 * coordinate near the plot. Non-finite values give 0.
 */
export function axisFraction(scale: AxisScale, value: number): number {
  if (!Number.isFinite(value)) return 0;
  const span = scale.max - scale.min;
  const fraction =
    Number.isFinite(span) && span > 0
      ? (value - scale.min) / span
      : (value / 2 - scale.min / 2) / (scale.max / 2 - scale.min / 2);
  if (!Number.isFinite(fraction)) return 0;
  return Math.min(Math.max(fraction, -1), 2);
}

/**
 * A tick label: fixed decimals, thousands grouped with commas, and never
 * "-0"; scientific notation (1.80e+308) for values too large or steps too
 * fine to write out.
 */
export function tickLabel(value: number, decimals: number): string {
  if (!Number.isFinite(value)) return 'n/a';
  const places = Number.isFinite(decimals) ? Math.max(0, Math.round(decimals)) : MAX_FIXED_DECIMALS + 1;
  if (Math.abs(value) >= LARGEST_FIXED_LABEL || places > MAX_FIXED_DECIMALS) {
    return value === 0 ? '0' : value.toExponential(2);
  }
  const fixed = (Object.is(value, -0) || Math.abs(value) < 10 ** -(places + 1) ? 0 : value).toFixed(places);
  const [whole, fraction] = fixed.split('.');
  const grouped = whole!.replace(/\B(?=(\d{3})+(?!\d))/g, ',');
  return fraction === undefined ? grouped : `${grouped}.${fraction}`;
}

/** The least and greatest finite value (a loop: spreading a long list into Math.min can overflow the stack); null when none is finite. */
export function finiteExtent(values: Iterable<number>): { min: number; max: number } | null {
  let min = Number.POSITIVE_INFINITY;
  let max = Number.NEGATIVE_INFINITY;
  for (const value of values) {
    if (!Number.isFinite(value)) continue;
    if (value < min) min = value;
    if (value > max) max = value;
  }
  return min <= max ? { min, max } : null;
}
