/**
 * Variable-base degree-days per day: the day-resolved terms of a changepoint
 * model for a reading that spans several days.
 *
 * A building answers each day's temperature, so over a bill of m days with
 * daily means T₁…T_m the expected heating term is the mean of the daily
 * hinge, (1/m)·Σ max(0, τ − T_d), not the hinge at the bill's mean
 * temperature. That mean is the heating degree-days per day at base τ, and
 * likewise for cooling: the variable-base degree-day method (ASHRAE
 * Handbook—Fundamentals, energy estimating methods; the base is fitted, not
 * fixed at 65 °F). For a one-day reading both reduce to the ordinary hinge.
 */

/**
 * Heating degree-days per day at base `base`: (1/m)·Σ max(0, base − T_d).
 * @example heatingDegreeDaysPerDay([40, 50, 60], 55) // 6.666… — (15 + 5 + 0)/3 (source: by hand, common practice)
 */
export function heatingDegreeDaysPerDay(temps: readonly number[], base: number): number {
  let sum = 0;
  for (const temp of temps) if (temp < base) sum += base - temp;
  return sum / temps.length;
}

/**
 * Cooling degree-days per day at base `base`: (1/m)·Σ max(0, T_d − base).
 * @example coolingDegreeDaysPerDay([60, 70, 80], 65) // 6.666… — (0 + 5 + 15)/3 (source: by hand, common practice)
 */
export function coolingDegreeDaysPerDay(temps: readonly number[], base: number): number {
  let sum = 0;
  for (const temp of temps) if (temp > base) sum += temp - base;
  return sum / temps.length;
}

/**
 * Share of the days colder than `base`: the derivative of the heating term
 * with respect to its base (where no day sits exactly on it).
 * @example shareBelow([40, 50, 60], 55) // 0.666… — two days of three lie below the base (source: by hand)
 */
export function shareBelow(temps: readonly number[], base: number): number {
  let count = 0;
  for (const temp of temps) if (temp < base) count++;
  return count / temps.length;
}

/**
 * Share of the days warmer than `base`: minus the derivative of the cooling
 * term with respect to its base.
 * @example shareAbove([60, 70, 80], 65) // 0.666… — two days of three lie above the base (source: by hand)
 */
export function shareAbove(temps: readonly number[], base: number): number {
  let count = 0;
  for (const temp of temps) if (temp > base) count++;
  return count / temps.length;
}
