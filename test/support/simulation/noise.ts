/**
 * Day-to-day noise of a meter's use around its building's signature: AR(1)
 * with the building's spread and persistence φ (0 = independent days), and
 * optionally a part shared by every meter on the station, so the meters'
 * errors correlate (occupancy, holidays and weather the temperature does not
 * capture hit them together).
 *
 * With own shocks aₜ and station shocks zₜ both unit-variance AR(1) with the
 * same φ, the noise eₜ = σ·(√(1 − s)·aₜ + √s·zₜ) has spread σ and
 * persistence φ, and two meters' noise correlates with coefficient s on
 * every lag; so the intra-class correlation of their bill residuals is s
 * (up to what the fit absorbs).
 */
import type { Random } from '../../../src/lib/seeded-random.js';
import { ar1Series } from '../synthetic.js';
import type { SimulatedBuilding } from './buildings.js';

/** Unit-variance AR(1) shocks shared by every meter on a station. */
export function stationShocks(days: number, persistence: number, random: Random): number[] {
  return ar1Series(days, 1, persistence, random);
}

/**
 * The meter's noise for `days` consecutive days. `shocks` are the station's
 * shared shocks over the same days, needed when the building has a station
 * share; their persistence should equal the building's.
 */
export function meterNoise(
  building: SimulatedBuilding,
  days: number,
  random: Random,
  shocks: readonly number[] | null,
): number[] {
  const share = building.stationShare;
  if (share > 0 && (shocks === null || shocks.length < days)) {
    throw new RangeError(`a building with a station share of ${share} needs ${days} days of station shocks`);
  }
  const own = ar1Series(days, 1, building.noisePersistence, random);
  const ownWeight = Math.sqrt(1 - share);
  const sharedWeight = Math.sqrt(share);
  return own.map(
    (value, d) => building.dailyNoise * (ownWeight * value + (share > 0 ? sharedWeight * shocks![d]! : 0)),
  );
}
