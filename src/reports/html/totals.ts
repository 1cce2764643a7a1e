/**
 * Energy and cost totals as tables whose every figure cell carries its key
 * and exact value (`data-total`, `data-value`), shared by the portfolio and
 * the facility sections: `<prefix>-savings-MMBtu`, `<prefix>-cost-USD`, ...
 */
import type { CommonEnergyUnit, CostTotal, EnergyTotal } from '../savings-report.js';
import { formatNumber, formatPercent } from '../format.js';
import { table, tag, text, totalCell } from './markup.js';

const UNITS: readonly CommonEnergyUnit[] = ['MMBtu', 'GJ'];
const ENERGY_DIGITS = 1;
const COST_DIGITS = 2;

type EnergyField = 'actual' | 'modelBaseline' | 'adjustments' | 'adjustedBaseline' | 'savings' | 'uncertainty';

const ROWS: readonly { label: string; key: string; field: EnergyField | 'fractionSaved' }[] = [
  { label: 'Actual use', key: 'actual', field: 'actual' },
  { label: 'Model baseline', key: 'model-baseline', field: 'modelBaseline' },
  { label: 'Non-routine adjustments', key: 'adjustments', field: 'adjustments' },
  { label: 'Adjusted baseline', key: 'adjusted-baseline', field: 'adjustedBaseline' },
  { label: 'Avoided energy', key: 'savings', field: 'savings' },
  { label: '± uncertainty', key: 'uncertainty', field: 'uncertainty' },
  { label: 'Fraction saved', key: 'fraction-saved', field: 'fractionSaved' },
];

/** A headline sentence: savings ± uncertainty in MMBtu and GJ, and the fraction saved. */
export function energyHeadline(totals: Record<CommonEnergyUnit, EnergyTotal>, confidenceLabel: string): string {
  const parts = UNITS.map(
    (unit) =>
      `${formatNumber(totals[unit].savings, ENERGY_DIGITS)} ± ${formatNumber(totals[unit].uncertainty, ENERGY_DIGITS)} ${unit}`,
  );
  const fraction =
    totals.MMBtu.fractionSaved === null
      ? ''
      : ` (${formatPercent(totals.MMBtu.fractionSaved)} of the adjusted baseline)`;
  return tag(
    'p',
    { class: 'headline' },
    `${tag('strong', {}, text('Avoided energy:'))} ${text(`${parts.join(' = ')}${fraction}, ± at ${confidenceLabel} confidence.`)}`,
  );
}

/** The common-unit totals, one column per unit. */
export function energyTotalsTable(
  prefix: string,
  totals: Record<CommonEnergyUnit, EnergyTotal>,
  confidenceLabel: string,
): string {
  const rows = ROWS.map((row) => {
    const label = row.field === 'uncertainty' ? `± uncertainty (${confidenceLabel})` : row.label;
    const cells = UNITS.map((unit) => {
      const total = totals[unit];
      if (row.field === 'fractionSaved')
        return totalCell(`${prefix}-${row.key}-${unit}`, total.fractionSaved, formatPercent(total.fractionSaved));
      return totalCell(`${prefix}-${row.key}-${unit}`, total[row.field], formatNumber(total[row.field], ENERGY_DIGITS));
    });
    return [tag('th', { scope: 'row' }, text(label)), ...cells];
  });
  return table({
    className: 'summary energy-totals',
    head: ['', ...UNITS.map((u) => ({ label: u, numeric: true }))],
    rows,
  });
}

/** Cost avoided by currency; an empty list says so in words. */
export function costTotalsTable(prefix: string, costs: readonly CostTotal[], confidenceLabel: string): string {
  if (costs.length === 0)
    return tag(
      'p',
      { class: 'note' },
      text('No cost avoided: no contract rates apply to these meters in this window.'),
    );
  const rows = costs.map((c) => [
    tag('th', { scope: 'row' }, text(c.currency)),
    totalCell(`${prefix}-cost-${c.currency}`, c.avoided, formatNumber(c.avoided, COST_DIGITS)),
    totalCell(`${prefix}-cost-uncertainty-${c.currency}`, c.uncertainty, formatNumber(c.uncertainty, COST_DIGITS)),
    totalCell(`${prefix}-periods-without-rate-${c.currency}`, c.periodsWithoutRate, String(c.periodsWithoutRate)),
  ]);
  return table({
    className: 'summary cost-totals',
    head: [
      'Currency',
      { label: 'Cost avoided', numeric: true },
      { label: `± (${confidenceLabel})`, numeric: true },
      { label: 'Periods without a rate', numeric: true },
    ],
    rows,
  });
}
