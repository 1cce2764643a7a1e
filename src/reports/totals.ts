/**
 * Totals of the report: one meter's figures in its own unit and converted
 * to the common units, and sums across meters with their uncertainties
 * combined with the between-meter correlation of their baseline residuals
 * (engine/portfolio-correlation.ts; without a correlation, in quadrature).
 */
import { combineCorrelated, convertEnergy, type ResidualCorrelation } from '../engine/index.js';
import type { CommonEnergyUnit, CostTotal, EnergyTotal } from './savings-report.js';

/**
 * How meters' ± combine: the pooled correlation within and across weather
 * stations, and each meter's station. Null correlations mean independence.
 */
export interface Rollup {
  correlation: Pick<ResidualCorrelation, 'withinGroup' | 'acrossGroups'>;
}

/** Independence: the ± of different meters in quadrature. */
export const IN_QUADRATURE: Rollup = { correlation: { withinGroup: null, acrossGroups: null } };

/** A meter's total with the station it is read on. */
export interface StationTotal<T> {
  total: T;
  station: string;
}

export const COMMON_UNITS: readonly CommonEnergyUnit[] = ['MMBtu', 'GJ'];

/** A total whose fraction saved is derived, never summed. */
export function energyTotal(unit: string, figures: Omit<EnergyTotal, 'unit' | 'fractionSaved'>): EnergyTotal {
  return {
    unit,
    ...figures,
    fractionSaved: figures.adjustedBaseline !== 0 ? figures.savings / figures.adjustedBaseline : null,
  };
}

/** The same total in another energy unit (every figure, the ± included, scales by the one factor). */
export function convertTotal(total: EnergyTotal, to: string): EnergyTotal {
  const c = (value: number) => convertEnergy(value, total.unit, to);
  return energyTotal(to, {
    actual: c(total.actual),
    modelBaseline: c(total.modelBaseline),
    adjustments: c(total.adjustments),
    adjustedBaseline: c(total.adjustedBaseline),
    savings: c(total.savings),
    uncertainty: c(total.uncertainty),
  });
}

/** Sum of meters' totals in one unit; the ± combined by the roll-up's correlation. */
export function sumTotals(
  unit: string,
  parts: readonly StationTotal<EnergyTotal>[],
  rollup: Rollup = IN_QUADRATURE,
): EnergyTotal {
  const sum = (pick: (t: EnergyTotal) => number) => parts.reduce((acc, p) => acc + pick(p.total), 0);
  return energyTotal(unit, {
    actual: sum((t) => t.actual),
    modelBaseline: sum((t) => t.modelBaseline),
    adjustments: sum((t) => t.adjustments),
    adjustedBaseline: sum((t) => t.adjustedBaseline),
    savings: sum((t) => t.savings),
    uncertainty: combineCorrelated(
      parts.map((p) => ({ value: p.total.uncertainty, group: p.station })),
      rollup.correlation,
    ),
  });
}

export function sumCommonTotals(
  parts: readonly StationTotal<Record<CommonEnergyUnit, EnergyTotal>>[],
  rollup: Rollup = IN_QUADRATURE,
): Record<CommonEnergyUnit, EnergyTotal> {
  const inUnit = (unit: CommonEnergyUnit) => parts.map((p) => ({ total: p.total[unit], station: p.station }));
  return { MMBtu: sumTotals('MMBtu', inUnit('MMBtu'), rollup), GJ: sumTotals('GJ', inUnit('GJ'), rollup) };
}

/** Costs summed per currency (in currency order); the ± combined by the roll-up's correlation. */
export function sumCosts(parts: readonly StationTotal<CostTotal>[], rollup: Rollup = IN_QUADRATURE): CostTotal[] {
  const byCurrency = new Map<string, StationTotal<CostTotal>[]>();
  for (const part of parts) byCurrency.set(part.total.currency, [...(byCurrency.get(part.total.currency) ?? []), part]);
  return [...byCurrency.keys()].sort().map((currency) => {
    const group = byCurrency.get(currency)!;
    return {
      currency,
      avoided: group.reduce((acc, c) => acc + c.total.avoided, 0),
      uncertainty: combineCorrelated(
        group.map((c) => ({ value: c.total.uncertainty, group: c.station })),
        rollup.correlation,
      ),
      periodsWithoutRate: group.reduce((acc, c) => acc + c.total.periodsWithoutRate, 0),
    };
  });
}

/** Each meter's common-unit totals with its station (meters outside the roll-up left out). */
export function commonParts(
  meters: readonly { common: Record<CommonEnergyUnit, EnergyTotal> | null; weatherStationId: string }[],
) {
  return meters.flatMap((m) => (m.common ? [{ total: m.common, station: m.weatherStationId }] : []));
}

/** Each meter's cost with its station. */
export function costParts(meters: readonly { cost: CostTotal | null; weatherStationId: string }[]) {
  return meters.flatMap((m) => (m.cost ? [{ total: m.cost, station: m.weatherStationId }] : []));
}
