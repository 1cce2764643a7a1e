/**
 * Figures a report cannot state. A sum or product of admissible inputs can
 * still leave the finite range (a rate escalating yearly over centuries of
 * dates), and such a figure is written as null in JSON, an empty cell in
 * CSV and "—" in HTML. These notices say which figures those are, so an
 * empty cell never passes for a zero or for a missing rate.
 */
import type { FacilityReport, MeterReport, SavingsReport } from './savings-report.js';

/** How many figures one notice names before summing up the rest. */
const LISTED = 6;

/** Paths of the non-finite numbers (NaN, ±Infinity) in `value`, in document order: "cost.avoided", "periods[3].costAvoided". */
export function nonFinitePaths(value: unknown, path = ''): string[] {
  if (typeof value === 'number') return Number.isFinite(value) ? [] : [path || '(value)'];
  if (Array.isArray(value)) return value.flatMap((item, i) => nonFinitePaths(item, `${path}[${i}]`));
  if (value !== null && typeof value === 'object') {
    return Object.entries(value).flatMap(([key, item]) => nonFinitePaths(item, path ? `${path}.${key}` : key));
  }
  return [];
}

/** The stated figures of a meter: totals, costs, periods and adjustments (not the chart points or the baseline's statistics). */
function meterFigures(meter: MeterReport): Record<string, unknown> {
  return {
    energy: meter.energy,
    common: meter.common,
    cost: meter.cost,
    periods: meter.periods.map((p) => ({
      actual: p.actual,
      adjustedBaseline: p.adjustedBaseline,
      savings: p.savings,
      rate: p.rate,
      costAvoided: p.costAvoided,
    })),
    adjustments: meter.adjustments.map((a) => ({ appliedInWindow: a.appliedInWindow })),
  };
}

function notice(where: string, paths: readonly string[]): string[] {
  if (paths.length === 0) return [];
  const listed = paths.slice(0, LISTED).join(', ');
  const more = paths.length > LISTED ? ` and ${paths.length - LISTED} more` : '';
  return [
    `${where}: not available, as no finite number results (too large to compute, or undefined for these data; check the inputs the figure rests on, such as a rate escalating over many years): ${listed}${more}`,
  ];
}

/** One notice per meter, facility and the portfolio that has figures it cannot state. */
export function notAvailableNotices(
  facilities: readonly FacilityReport[],
  portfolio: Pick<SavingsReport['portfolio'], 'totals' | 'cost'>,
): string[] {
  return [...facilities.flatMap(facilityNotAvailableNotices), ...portfolioNotAvailableNotices(portfolio)];
}

/** The notices of one facility and its meters. */
export function facilityNotAvailableNotices(facility: FacilityReport): string[] {
  const out: string[] = [];
  for (const meter of facility.meters)
    out.push(...notice(`${facility.name}, ${meter.name}`, nonFinitePaths(meterFigures(meter))));
  out.push(
    ...notice(
      facility.name,
      nonFinitePaths({ totals: facility.totals, cost: facility.cost, guarantees: facility.guarantees }),
    ),
  );
  return out;
}

/** The portfolio's notice, if its totals hold a figure it cannot state. */
export function portfolioNotAvailableNotices(portfolio: Pick<SavingsReport['portfolio'], 'totals' | 'cost'>): string[] {
  return notice('Portfolio', nonFinitePaths({ totals: portfolio.totals, cost: portfolio.cost }));
}
