/**
 * Upper bounds on every number that enters the ledger: reading quantities
 * and costs, contract rates, non-routine adjustments, contract guarantees
 * and floor areas. The one home of these figures: the HTTP schemas, the
 * services and the command line all check against them.
 *
 * Why bounds at all: a finite but absurd figure (10^300 kWh) is accepted by
 * every "is it a number" check, and then sums, products and chart axes built
 * on it round to Infinity. No real meter comes near these bounds, so a
 * figure beyond one is a typing or unit error, and refusing it names the
 * field. Within them every sum the ledger forms (a reading's use per day
 * times every day of the ISO calendar, times the largest price) stays many
 * orders of magnitude below the largest double.
 *
 * Units are the meter's own (the ledger does not know whether a meter counts
 * Wh or MMBtu), so each bound is set for the smallest unit a meter plausibly
 * uses. Quantities are bounded per day, so a long bill is never refused for
 * its length.
 */
import { parseIsoDate } from './dates.js';
import type { InputProblem } from './input-problem.js';

/** One bound: the figure, what it is per, and where it comes from. */
export interface InputBound {
  /** The largest magnitude accepted. */
  readonly max: number;
  /** What the figure is measured in, for messages and the README. */
  readonly per: string;
  /** "common practice" (no source), or "our own bound" (our reasoning, in the comment beside it). */
  readonly source: 'common practice' | 'our own bound';
}

/**
 * Our own bound: 10¹² of the meter's unit per day. The largest single sites
 * (a steel works, a data-centre campus) draw a few gigawatts: 5 GW all day
 * is 1.2·10⁸ kWh, 1.2·10¹¹ Wh or 4.1·10¹¹ Btu, all below it even in the
 * smallest standard units. Also bounds non-routine adjustments per day.
 */
export const MAX_USE_PER_DAY: InputBound = { max: 1e12, per: "of the meter's unit per day", source: 'our own bound' };

/**
 * Our own bound: 10¹⁴ currency units per day of billed cost. Such a site
 * pays about 10⁷ US dollars a day at 0.10 USD/kWh; in a currency of 10⁶ to
 * the dollar that is 10¹³, a tenth of the bound.
 */
export const MAX_COST_PER_DAY: InputBound = { max: 1e14, per: 'currency units per day', source: 'our own bound' };

/**
 * Our own bound: 10¹⁰ currency units per unit of the meter. Capped
 * wholesale electricity reaches a few US dollars per kWh (about 1,500
 * dollars per MMBtu or 5,000 per MWh); in a currency of 10⁶ to the dollar
 * that is 5·10⁹ per MWh, below the bound.
 */
export const MAX_PRICE: InputBound = {
  max: 1e10,
  per: 'currency units per unit of the meter',
  source: 'our own bound',
};

/**
 * Yearly escalation of a rate as a fraction: above −1 (the rate would
 * vanish or change sign) and at most 1 (more than doubling a year is taken
 * as a typing error). Our own bound.
 */
export const ESCALATION = {
  min: -1,
  minExclusive: true,
  max: 1,
  per: 'fraction a year (0.03 = 3%)',
  source: 'our own bound',
} as const;

/**
 * Our own bound: a contract year's energy guarantee is at most a year
 * (366 days) of the largest use per day, in the contract's energy unit.
 */
export const MAX_GUARANTEE_ENERGY: InputBound = {
  max: MAX_USE_PER_DAY.max * 366,
  per: "of the contract's energy unit per contract year",
  source: 'our own bound',
};

/** Our own bound: a contract year's cost guarantee is at most a year (366 days) of the largest cost per day. */
export const MAX_GUARANTEE_COST: InputBound = {
  max: MAX_COST_PER_DAY.max * 366,
  per: 'currency units per contract year',
  source: 'our own bound',
};

/**
 * Our own bound: 10⁹ ft² or m². The largest buildings have about 2·10⁷ ft²
 * (2·10⁶ m²); a facility may be a campus of many, and 10⁹ m² is 1,000 km².
 */
export const MAX_FLOOR_AREA: InputBound = { max: 1e9, per: 'ft² or m²', source: 'our own bound' };

/**
 * Our own bound: at most 1,000 periods required in each segment of a
 * changepoint shape (a fitting option). Thirty years of daily readings
 * split in two segments need fewer; beyond it every shape is refused
 * anyway, so a larger figure is a typing error.
 */
export const MAX_POINTS_PER_SEGMENT = 1000;

/** The bound as text: 1e12, 3.66e14. */
export function boundText(max: number): string {
  return max.toExponential().replace('e+', 'e');
}

/** A figure in a message: four significant digits once it is large (2.500e13 rather than 25000000000000.004). */
function figure(value: number): string {
  return Math.abs(value) >= 1e6 ? value.toPrecision(4).replace('e+', 'e') : String(Number(value.toPrecision(6)));
}

/**
 * Why `value` is refused as a magnitude beyond `bound`, or null when it is
 * within it (non-finite values are other checks' business and give null).
 */
export function beyondBound(value: number, bound: InputBound): string | null {
  if (!Number.isFinite(value) || Math.abs(value) <= bound.max) return null;
  return `${figure(value)} is beyond the bound of ±${boundText(bound.max)} ${bound.per} (a larger figure is taken as a typing or unit error)`;
}

/**
 * Why a total over [start, end) is refused for its figure per day, or null
 * when it is within `bound` (or the dates or the value are not usable: other
 * checks name those).
 */
export function beyondBoundPerDay(total: number, start: string, end: string, bound: InputBound): string | null {
  const first = parseIsoDate(start);
  const last = parseIsoDate(end);
  if (first === null || last === null || last <= first || !Number.isFinite(total)) return null;
  const days = last - first;
  if (Math.abs(total) / days <= bound.max) return null;
  return `${figure(total)} over ${days} day${days === 1 ? '' : 's'} is ${figure(Math.abs(total) / days)} a day, beyond the bound of ${boundText(bound.max)} ${bound.per} (a larger figure is taken as a typing or unit error)`;
}

/** Rate entries' prices against MAX_PRICE (escalation is checked with the schedule). */
export function checkRateBounds(entries: readonly { price: number }[]): InputProblem[] {
  const problems: InputProblem[] = [];
  entries.forEach((entry, index) => {
    const price = beyondBound(entry.price, MAX_PRICE);
    if (price) problems.push({ index, field: 'price', message: price });
  });
  return problems;
}

/** Every bound, for the README and the OpenAPI descriptions. */
export const INPUT_BOUNDS = {
  'reading quantity': MAX_USE_PER_DAY,
  'reading cost': MAX_COST_PER_DAY,
  'rate price': MAX_PRICE,
  'adjustment (quantity per day, or perDay)': MAX_USE_PER_DAY,
  'energy guarantee': MAX_GUARANTEE_ENERGY,
  'cost guarantee': MAX_GUARANTEE_COST,
  'floor area': MAX_FLOOR_AREA,
} as const;
