/**
 * Totals of the report: one meter's figures in its own unit and converted
 * to the common units, and sums across meters with their uncertainties
 * combined in quadrature (independence between meters assumed).
 */
import { combineInQuadrature, convertEnergy } from '../engine/index.js';
import type { CommonEnergyUnit, CostTotal, EnergyTotal } from './savings-report.js';

export const COMMON_UNITS: readonly CommonEnergyUnit[] = ['MMBtu', 'GJ'];

/** A total whose fraction saved is derived, never summed. */
export function energyTotal(unit: string, figures: Omit<EnergyTotal, 'unit' | 'fractionSaved'>): EnergyTotal {
  return { unit, ...figures, fractionSaved: figures.adjustedBaseline !== 0 ? figures.savings / figures.adjustedBaseline : null };
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

/** Sum of totals in one unit; the ± in quadrature. */
export function sumTotals(unit: string, totals: readonly EnergyTotal[]): EnergyTotal {
  const sum = (pick: (t: EnergyTotal) => number) => totals.reduce((acc, t) => acc + pick(t), 0);
  return energyTotal(unit, {
    actual: sum((t) => t.actual),
    modelBaseline: sum((t) => t.modelBaseline),
    adjustments: sum((t) => t.adjustments),
    adjustedBaseline: sum((t) => t.adjustedBaseline),
    savings: sum((t) => t.savings),
    uncertainty: combineInQuadrature(totals.map((t) => t.uncertainty)),
  });
}

export function sumCommonTotals(totals: readonly Record<CommonEnergyUnit, EnergyTotal>[]): Record<CommonEnergyUnit, EnergyTotal> {
  return { MMBtu: sumTotals('MMBtu', totals.map((t) => t.MMBtu)), GJ: sumTotals('GJ', totals.map((t) => t.GJ)) };
}

/** Costs summed per currency (in currency order); the ± in quadrature. */
export function sumCosts(costs: readonly CostTotal[]): CostTotal[] {
  const byCurrency = new Map<string, CostTotal[]>();
  for (const cost of costs) byCurrency.set(cost.currency, [...(byCurrency.get(cost.currency) ?? []), cost]);
  return [...byCurrency.keys()].sort().map((currency) => {
    const group = byCurrency.get(currency)!;
    return {
      currency,
      avoided: group.reduce((acc, c) => acc + c.avoided, 0),
      uncertainty: combineInQuadrature(group.map((c) => c.uncertainty)),
      periodsWithoutRate: group.reduce((acc, c) => acc + c.periodsWithoutRate, 0),
    };
  });
}
