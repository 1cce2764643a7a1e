/** The words every savings report carries: its method, sources and caution. */
import {
  DEFAULT_EXTRAPOLATION_LIMIT,
  ENERGY_FACTOR_SOURCE,
  MIN_BASELINE_BILLS,
  MIN_BASELINE_DAYS,
  MIN_NORMALISED_REPORTING_DAYS,
} from '../engine/index.js';
import type { SavingsReport } from './savings-report.js';

export const REPORT_CAUTION =
  'The figures in this report are estimates made under the contract’s M&V plan and the methods cited here. Contractual and engineering decisions rest with the parties and a licensed professional, under local rules.';

export function reportMethod(confidence: number): SavingsReport['method'] {
  const percent = `${Math.round(confidence * 100)}%`;
  return {
    summary:
      'Whole-facility regression (IPMVP whole-facility option with ASHRAE Guideline 14 changepoint models): each meter’s frozen baseline model, as stored and never refitted, is projected onto the weather of each reporting period in the temperature form it was frozen with; adjusted baseline = model projection + non-routine adjustments; avoided energy = adjusted baseline − actual.',
    readingsInWindow:
      'A reading belongs to the window that holds its midpoint (start + half its days), so every bill counts in exactly one quarter or contract year; only readings starting on or after the frozen baseline’s end count as reporting readings.',
    temperatureForm:
      'Each meter’s baseline keeps the temperature form it was frozen with, and every projection of it uses that form; a baseline is never refitted. Day-resolved (the variable-base degree-day method, ASHRAE Handbook—Fundamentals): a building answers each day’s temperature, so a bill’s expected use per day is the mean over the bill’s own days of the daily changepoint response (heating and cooling degree-days per day at the fitted base), not the response at the bill’s mean temperature; because the response is convex, a bill whose days straddle a changepoint sits above the daily line at its mean temperature. Mean form: each period is taken at its mean temperature, as baselines frozen before the day-resolved form were fitted. Each meter’s form is stated with its baseline.',
    checks: `A baseline must cover a full cycle of seasons (at least ${MIN_BASELINE_DAYS} days of usable periods and, for bills, at least ${MIN_BASELINE_BILLS} of them; common practice, not a standard) to be frozen, unless it was frozen with a short-baseline override and its reason. A window in which more than ${Math.round(DEFAULT_EXTRAPOLATION_LIMIT * 100)}% of the reporting days have weather outside what the baseline saw (a limit of our own: daily temperatures against the daily range for a day-resolved baseline, period means against the range of baseline means for a mean-form one) gets no figures for that meter unless its baseline was frozen with an extrapolation override; every override is stated with its reason in the meter’s notes.`,
    adjustments:
      'Non-routine adjustments are documented figures in the meter’s unit, spread evenly over their days and added to the adjusted baseline of the periods they cover (a positive figure raises it). An adjustment may carry the engineer’s standard uncertainty of its total: the part inside the window carries the same share of it (one error, shared by its days), and different adjustments combine in quadrature.',
    costs:
      'Cost avoided per period = avoided energy × the day-weighted mean contract rate over the period’s days (effective-dated, with yearly escalation on each anniversary). A period with any day lacking a rate has no cost and is listed; no rate is ever assumed.',
    uncertainty: `Every ± is stated at ${percent} two-sided confidence. Per meter it combines, in quadrature, the model’s ± (the larger of the ASHRAE Guideline 14 Annex B fractional savings uncertainty (Reddy and Claridge, 2000) and the exact regression variance of the total with the changepoints held at their fitted values, both widened for lag-1 autocorrelation of the baseline residuals) with the non-routine adjustments’ own ± (their stated standard uncertainties scaled by the normal quantile at that confidence); every meter ±, and every roll-up and guarantee ± built from it, is this combined one. A cost ± is the energy ± times the meter’s mean rate.`,
    independence:
      'Meters read on the same weather share what it does that their models do not see, so their errors are correlated and a sum of them is less certain than quadrature says. Every roll-up (facility, portfolio, contract year) combines the meters’ ± as √(Σ vᵢ² + Σ ρᵢⱼ·vᵢ·vⱼ), with ρ the pooled correlation of the report’s meters’ baseline residuals (spread over calendar months by days, standardised per meter; one figure for meters on the same weather station and one across stations, negative values taken as 0; stated in the report’s roll-up figures). With fewer than two meters sharing six months of residuals the correlation is taken as 0 (quadrature).',
    normalised: `Normalised savings apply the frozen baseline and a reporting-period model (fitted to the window’s reporting readings with the same shape selection, in the baseline’s temperature form) to the station’s normal year of daily temperatures (day by day for day-resolved models and daily readings; as calendar-month means for a mean-form model fitted on bills, which has only seen period means); they need at least ${MIN_NORMALISED_REPORTING_DAYS} days of reporting periods in the window, so a quarter alone does not support them. Their ± is both models’ prediction variance of their normal-year use (each (n/n′)·σ²·cᵀ(XᵀWX)⁻¹c, c the normal year’s summed design rows), added and stated at ${percent}: the uncertainty of the two models, not of any year’s weather. Non-routine adjustments are not applied to them.`,
    sources: [
      'ASHRAE Guideline 14, Measurement of Energy, Demand, and Water Savings (changepoint models, CV(RMSE), NMBE, Annex B uncertainty)',
      'IPMVP, International Performance Measurement and Verification Protocol (whole-facility option, adjusted baseline, non-routine adjustments, normalised savings)',
      'Reddy, T. A. and Claridge, D. E. (2000), Uncertainty of “measured” energy savings from statistical baseline models, HVAC&R Research 6(1)',
      'ASHRAE Handbook—Fundamentals, energy estimating and modelling methods (the variable-base degree-day method)',
      ENERGY_FACTOR_SOURCE,
    ],
  };
}
