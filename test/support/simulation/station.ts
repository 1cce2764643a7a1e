/**
 * A weather station of the simulation: its invented climate, the daily
 * weather it reports over the study, and (for portfolio runs) the daily
 * shocks shared by every meter that reads its weather.
 */
import type { DailyTemperature } from '../../../src/engine/types.js';
import type { Random } from '../../../src/lib/seeded-random.js';
import type { Climate } from '../synthetic.js';
import { stationWeather } from './climates.js';
import { stationShocks } from './noise.js';

export interface Station {
  climate: Climate;
  /** First day of the weather (and of the shocks). */
  start: string;
  weather: DailyTemperature[];
  /** Unit-variance AR(1) shocks shared by the station's meters, one per weather day; null when none are shared. */
  shocks: number[] | null;
}

/**
 * The station over `days` days from `start`. Weather is drawn first, then
 * the shared shocks (only when `sharedShocks` is given).
 */
export function makeStation(
  climate: Climate,
  start: string,
  days: number,
  random: Random,
  sharedShocks?: { persistence: number },
): Station {
  const weather = stationWeather(climate, start, days, random);
  const shocks = sharedShocks ? stationShocks(days, sharedShocks.persistence, random) : null;
  return { climate, start, weather, shocks };
}
