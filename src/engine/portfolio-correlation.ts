/**
 * Combining meters' savings bands when their errors are correlated.
 *
 * Meters read on the same weather share whatever the weather does that the
 * models do not see (sun, wind, a holiday week), so their departures from
 * their baselines move together: added in quadrature, as if independent,
 * their bands are too narrow for the total. The correlation is estimated
 * from the meters' own baseline residuals: each meter's residuals are spread
 * over calendar months by days (so bills read on different dates line up),
 * standardised, and pooled into one mean pairwise correlation for meters on
 * the same station and one for meters on different stations (the mean of
 * products over every pair of meters present in the same month: the
 * intra-class correlation of the residuals). Negative pooled values are taken
 * as 0, so the combination never claims more precision than quadrature.
 * The combined half-width is then
 *   √(Σ vᵢ² + Σ_{i≠j} ρᵢⱼ·vᵢ·vⱼ),
 * ρᵢⱼ the within-station value for two meters on one station and the
 * across-station value otherwise.
 */
import { daysInMonth, formatDayNumber, parseIsoDate } from './dates.js';

/** One meter's baseline residuals (quantity − days × fitted use per day), with its group (its weather station). */
export interface MeterResiduals {
  group: string;
  periods: readonly { start: string; end: string; residual: number }[];
}

export interface ResidualCorrelation {
  /** Pooled correlation of meters on the same station, floored at 0; null when no two such meters share enough months. */
  withinGroup: number | null;
  /** Pooled correlation of meters on different stations, floored at 0; null when none share enough months. */
  acrossGroups: number | null;
  /** Meter pairs that entered each figure. */
  pairsWithin: number;
  pairsAcross: number;
  /** The method in words, for reports. */
  method: string;
}

/** Fewest calendar months of residuals a meter needs to enter the estimate (common practice: half a year). */
export const MIN_CORRELATION_MONTHS = 6;

export const CORRELATION_METHOD =
  'baseline residuals spread over calendar months by days, standardised per meter, and pooled into one mean pairwise correlation for meters on the same weather station and one for meters on different stations (negative values taken as 0)';

/** A meter's residuals per calendar month ('YYYY-MM'), each period's residual spread over its days. */
export function monthlyResiduals(periods: MeterResiduals['periods']): Map<string, number> {
  const months = new Map<string, number>();
  for (const period of periods) {
    const first = parseIsoDate(period.start);
    const end = parseIsoDate(period.end);
    if (first === null || end === null || !(end > first) || !Number.isFinite(period.residual)) continue;
    const perDay = period.residual / (end - first);
    let day = first;
    while (day < end) {
      const date = formatDayNumber(day);
      const month = date.slice(0, 7);
      // Days to the end of this calendar month or of the period, whichever comes first (one step per month, not per day).
      const monthEnd =
        day - (Number(date.slice(8, 10)) - 1) + daysInMonth(Number(date.slice(0, 4)), Number(date.slice(5, 7)));
      const next = end < monthEnd ? end : monthEnd;
      months.set(month, (months.get(month) ?? 0) + perDay * (next - day));
      day = next;
    }
  }
  return months;
}

/** Standardise a meter's monthly series to mean 0 and variance 1, or null when it is too short or constant. */
function standardised(months: Map<string, number>): Map<string, number> | null {
  if (months.size < MIN_CORRELATION_MONTHS) return null;
  const values = [...months.values()];
  const mean = values.reduce((a, v) => a + v, 0) / values.length;
  const variance = values.reduce((a, v) => a + (v - mean) ** 2, 0) / values.length;
  if (!(variance > 0)) return null;
  const sd = Math.sqrt(variance);
  return new Map([...months].map(([month, value]) => [month, (value - mean) / sd]));
}

/** Pooled between-meter correlation of baseline residuals, within and across groups (see the module comment). */
export function residualCorrelation(meters: readonly MeterResiduals[]): ResidualCorrelation {
  const pooled = new PooledResidualCorrelation();
  for (const meter of meters) pooled.add(meter);
  return pooled.result();
}

/**
 * The same pooled correlation, built one meter at a time: memory grows with
 * the months and stations seen, not with the meters, so a report can pass
 * over any number of meters. Adding meters in the same order as
 * residualCorrelation gives the same figures, bit for bit.
 */
export class PooledResidualCorrelation {
  /** For every month: Σz and Σz² over all meters present, and per group. */
  private readonly byMonth = new Map<
    string,
    {
      sum: number;
      squares: number;
      count: number;
      groups: Map<string, { sum: number; squares: number; count: number }>;
    }
  >();
  private readonly metersPerGroup = new Map<string, number>();
  private series = 0;

  add(meter: MeterResiduals): void {
    const z = standardised(monthlyResiduals(meter.periods));
    if (z === null) return;
    const group = meter.group;
    for (const [month, value] of z) {
      const entry = this.byMonth.get(month) ?? { sum: 0, squares: 0, count: 0, groups: new Map() };
      entry.sum += value;
      entry.squares += value * value;
      entry.count += 1;
      const inGroup = entry.groups.get(group) ?? { sum: 0, squares: 0, count: 0 };
      inGroup.sum += value;
      inGroup.squares += value * value;
      inGroup.count += 1;
      entry.groups.set(group, inGroup);
      this.byMonth.set(month, entry);
    }
    this.metersPerGroup.set(group, (this.metersPerGroup.get(group) ?? 0) + 1);
    this.series += 1;
  }

  result(): ResidualCorrelation {
    let withinProducts = 0;
    let withinPairs = 0;
    let allProducts = 0;
    let allPairs = 0;
    for (const entry of this.byMonth.values()) {
      allProducts += entry.sum * entry.sum - entry.squares;
      allPairs += entry.count * (entry.count - 1);
      for (const g of entry.groups.values()) {
        withinProducts += g.sum * g.sum - g.squares;
        withinPairs += g.count * (g.count - 1);
      }
    }
    const acrossProducts = allProducts - withinProducts;
    const acrossPairs = allPairs - withinPairs;
    const clamp = (value: number): number => Math.min(1, Math.max(0, value));
    const groupSizes = [...this.metersPerGroup.values()];
    const pairsWithin = groupSizes.reduce((a, size) => a + (size * (size - 1)) / 2, 0);
    const pairsAcross = (this.series * (this.series - 1)) / 2 - pairsWithin;
    return {
      withinGroup: withinPairs > 0 ? clamp(withinProducts / withinPairs) : null,
      acrossGroups: acrossPairs > 0 ? clamp(acrossProducts / acrossPairs) : null,
      pairsWithin,
      pairsAcross,
      method: CORRELATION_METHOD,
    };
  }
}

/**
 * √(Σ vᵢ² + Σ_{i≠j} ρᵢⱼ·vᵢ·vⱼ): the half-width of a sum of parts whose own
 * half-widths are vᵢ, with correlation `withinGroup` between parts of one
 * group and `acrossGroups` between parts of different groups (null: 0).
 * @example combineCorrelated([{ value: 3, group: 'a' }, { value: 4, group: 'a' }], { withinGroup: 1, acrossGroups: 0 }) // 7 — fully correlated parts add: √(3² + 4² + 2·1·3·4) (source: by hand)
 */
export function combineCorrelated(
  parts: readonly { value: number; group: string }[],
  correlation: Pick<ResidualCorrelation, 'withinGroup' | 'acrossGroups'>,
): number {
  const within = correlation.withinGroup ?? 0;
  const across = correlation.acrossGroups ?? 0;
  let squares = 0;
  let total = 0;
  const groups = new Map<string, { sum: number; squares: number }>();
  for (const { value, group } of parts) {
    const v = Math.abs(value);
    if (Number.isNaN(v)) return Number.NaN;
    squares += v * v;
    total += v;
    const g = groups.get(group) ?? { sum: 0, squares: 0 };
    g.sum += v;
    g.squares += v * v;
    groups.set(group, g);
  }
  let withinCross = 0;
  let groupSums = 0;
  for (const g of groups.values()) {
    withinCross += g.sum * g.sum - g.squares;
    groupSums += g.sum * g.sum;
  }
  const acrossCross = total * total - groupSums;
  return Math.sqrt(Math.max(0, squares + within * withinCross + across * acrossCross));
}
