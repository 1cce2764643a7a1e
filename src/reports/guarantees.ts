/**
 * Measured against guaranteed: for each contract year the report touches,
 * the facility's savings from the year's start to the report's end (or the
 * year's end), beside the guaranteed figure, with the shortfall or surplus
 * and the ± band. Cumulative savings by period end feed the chart.
 */
import { convertEnergy } from '../engine/index.js';
import type { ContractSummary, GuaranteeStatus, MeterReport } from './savings-report.js';
import { commonParts, costParts, IN_QUADRATURE, sumCommonTotals, sumCosts, type Rollup } from './totals.js';

export interface ContractYearFigures {
  contractYear: number;
  yearStart: string;
  yearEnd: string;
  measuredThrough: string;
  complete: boolean;
  /** The facility's meters computed over [yearStart, measuredThrough). */
  meters: readonly MeterReport[];
}

export function guaranteeStatus(
  contract: ContractSummary,
  figures: ContractYearFigures,
  rollup: Rollup = IN_QUADRATURE,
): GuaranteeStatus {
  const guarantee = contract.guarantees.find((g) => g.year === figures.contractYear);
  const totals = sumCommonTotals(commonParts(figures.meters), rollup);
  const toUnit = (mmbtu: number) => convertEnergy(mmbtu, 'MMBtu', contract.energyUnit);
  const costs = sumCosts(costParts(figures.meters), rollup);
  const cost = costs.find((c) => c.currency === contract.currency);
  const notes: string[] = [];
  const withFigures = figures.meters.filter((m) => m.missing === null);
  const leftOut = withFigures.filter((m) => m.common === null).map((m) => m.name);
  if (guarantee?.energy != null && leftOut.length > 0)
    notes.push(`energy measured without ${leftOut.join(', ')} (no standard energy factor)`);
  const priced = withFigures.filter((m) => m.cost?.currency === contract.currency);
  if (guarantee?.cost != null && contract.currency !== null) {
    if (priced.length === 0)
      notes.push(`the cost guarantee cannot be measured: no meter has contract rates in ${contract.currency}`);
    else if (priced.length < withFigures.length)
      notes.push(
        `cost measured from ${priced.length} of ${withFigures.length} meters (the others have no rates in ${contract.currency})`,
      );
    if (cost && cost.periodsWithoutRate > 0)
      notes.push(`${cost.periodsWithoutRate} period(s) without a contract rate count no cost`);
  }

  const energy =
    guarantee?.energy != null
      ? {
          unit: contract.energyUnit,
          guaranteed: guarantee.energy,
          measured: toUnit(totals.MMBtu.savings),
          uncertainty: toUnit(totals.MMBtu.uncertainty),
          difference: toUnit(totals.MMBtu.savings) - guarantee.energy,
        }
      : null;
  const costLine =
    guarantee?.cost != null && contract.currency !== null && cost !== undefined
      ? {
          currency: contract.currency,
          guaranteed: guarantee.cost,
          measured: cost.avoided,
          uncertainty: cost.uncertainty,
          difference: cost.avoided - guarantee.cost,
        }
      : null;

  return {
    contractYear: figures.contractYear,
    yearStart: figures.yearStart,
    yearEnd: figures.yearEnd,
    measuredThrough: figures.measuredThrough,
    complete: figures.complete,
    energy,
    cost: costLine,
    cumulative: cumulativeSavings(
      figures.meters.filter((m) => m.common !== null),
      figures.meters,
      contract,
    ),
    notes,
    metersWithData: withFigures.length,
  };
}

/** Running totals by period end, in the contract's energy unit and currency. */
function cumulativeSavings(
  inRollup: readonly MeterReport[],
  all: readonly MeterReport[],
  contract: ContractSummary,
): GuaranteeStatus['cumulative'] {
  const steps = new Map<string, { energy: number; cost: number }>();
  const step = (end: string) => steps.get(end) ?? { energy: 0, cost: 0 };
  for (const meter of inRollup) {
    for (const p of meter.periods) {
      const s = step(p.end);
      s.energy += convertEnergy(p.savings, meter.unit, contract.energyUnit);
      steps.set(p.end, s);
    }
  }
  for (const meter of all) {
    if (meter.cost === null || meter.cost.currency !== contract.currency) continue;
    for (const p of meter.periods) {
      if (p.costAvoided === null) continue;
      const s = step(p.end);
      s.cost += p.costAvoided;
      steps.set(p.end, s);
    }
  }
  let energy = 0;
  let cost = 0;
  return [...steps.keys()].sort().map((end) => {
    energy += steps.get(end)!.energy;
    cost += steps.get(end)!.cost;
    return { end, energy, cost: contract.currency === null ? null : cost };
  });
}
