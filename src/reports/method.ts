/** The words every savings report carries: its method, sources and caution. */
import { ENERGY_FACTOR_SOURCE, MIN_NORMALISED_REPORTING_DAYS } from '../engine/index.js';
import type { SavingsReport } from './savings-report.js';

export const REPORT_CAUTION =
  'The figures in this report are estimates made under the contract’s M&V plan and the methods cited here. Contractual and engineering decisions rest with the parties and a licensed professional, under local rules.';

export function reportMethod(confidence: number): SavingsReport['method'] {
  const percent = `${Math.round(confidence * 100)}%`;
  return {
    summary:
      'Whole-facility regression (IPMVP whole-facility option with ASHRAE Guideline 14 changepoint models): each meter’s frozen baseline model, as stored and never refitted, is projected onto the weather of each reporting period; adjusted baseline = model projection + non-routine adjustments; avoided energy = adjusted baseline − actual.',
    readingsInWindow:
      'A reading belongs to the window that holds its midpoint (start + half its days), so every bill counts in exactly one quarter or contract year; only readings starting on or after the frozen baseline’s end count as reporting readings.',
    adjustments:
      'Non-routine adjustments are documented figures in the meter’s unit, spread evenly over their days and added to the adjusted baseline of the periods they cover (a positive figure raises it). They change the savings, not the model’s uncertainty.',
    costs:
      'Cost avoided per period = avoided energy × the day-weighted mean contract rate over the period’s days (effective-dated, with yearly escalation on each anniversary). A period with any day lacking a rate has no cost and is listed; no rate is ever assumed.',
    uncertainty: `Every ± is stated at ${percent} two-sided confidence. Per meter it is the larger of the ASHRAE Guideline 14 Annex B fractional savings uncertainty (Reddy and Claridge, 2000) and the exact regression variance of the total with the changepoints held at their fitted values, both widened for lag-1 autocorrelation of the baseline residuals. A cost ± is the energy ± times the meter’s mean rate.`,
    independence:
      'Uncertainties of different meters are combined in quadrature (square root of the sum of squares), which assumes the meters’ model errors are independent; meters that share weather and occupancy may be correlated, in which case the combined band is too narrow.',
    normalised: `Normalised savings apply the frozen baseline and a reporting-period model (fitted to the window’s reporting readings with the same shape selection) to the station’s normal year of daily temperatures (as calendar-month means when the meter is read in bills, since a model fitted on bills has only seen period means; day by day for daily readings); they need at least ${MIN_NORMALISED_REPORTING_DAYS} days of reporting periods in the window, so a quarter alone does not support them. Non-routine adjustments are not applied to them.`,
    sources: [
      'ASHRAE Guideline 14, Measurement of Energy, Demand, and Water Savings (changepoint models, CV(RMSE), NMBE, Annex B uncertainty)',
      'IPMVP, International Performance Measurement and Verification Protocol (whole-facility option, adjusted baseline, non-routine adjustments, normalised savings)',
      'Reddy, T. A. and Claridge, D. E. (2000), Uncertainty of “measured” energy savings from statistical baseline models, HVAC&R Research 6(1)',
      ENERGY_FACTOR_SOURCE,
    ],
  };
}
