/**
 * Invented climates for calibration runs (°F): a seasonal cycle plus
 * day-to-day weather that runs in spells (AR(1) departures with persistence
 * 0.7–0.85 and a spread of its own per climate), reported to 0.1° as a
 * station reports it. No real place: the figures are chosen to give the
 * regions a changepoint building can see (mostly heating, heating and
 * cooling, mostly cooling).
 *
 * Synthetic: the simulation sets the truth.
 */
import { NORMAL_YEAR_DAYS } from '../../../src/engine/normal-year.js';
import type { DailyTemperature } from '../../../src/engine/types.js';
import type { Random } from '../../../src/lib/seeded-random.js';
import { dailyWeather, seasonalTemperature, type Climate } from '../synthetic.js';

export type ClimateName = 'mild' | 'continental' | 'cold' | 'hot';

/** The four invented climates, by name. */
export const INVENTED_CLIMATES: Readonly<Record<ClimateName, Climate>> = {
  /** Maritime-like: cool winters, mild summers (seasonal 48–64 °F); heating much of the year, little cooling. */
  mild: { mean: 56, amplitude: 8, dailySpread: 4, persistence: 0.75, coldestDay: 20 },
  /** Cold winters and warm summers (seasonal 26–74 °F): heating, flat band and cooling all seen. */
  continental: { mean: 50, amplitude: 24, dailySpread: 7, persistence: 0.8, coldestDay: 18 },
  /** Long cold winters, short cool summers (seasonal 12–64 °F): heating dominates, warm spells are rare. */
  cold: { mean: 38, amplitude: 26, dailySpread: 7.5, persistence: 0.85, coldestDay: 22 },
  /** Warm all year (seasonal 64–86 °F): cooling dominates, cool spells in winter only. */
  hot: { mean: 75, amplitude: 11, dailySpread: 3.5, persistence: 0.7, coldestDay: 15 },
};

export const CLIMATE_NAMES: readonly ClimateName[] = ['mild', 'continental', 'cold', 'hot'];

/** Daily station weather for `days` days from `start`: the seasonal curve plus AR(1) spells, to 0.1°. */
export function stationWeather(climate: Climate, start: string, days: number, random: Random): DailyTemperature[] {
  return dailyWeather(climate, start, days, random);
}

/**
 * An invented normal year for the climate: the seasonal curve's value on
 * each of the 365 normal-year days (no day-to-day weather), to 0.1°, in
 * NORMAL_YEAR_DAYS order.
 */
export function normalYearTemperatures(climate: Climate): number[] {
  return NORMAL_YEAR_DAYS.map((_, dayOfYear) => Math.round(seasonalTemperature(climate, dayOfYear) * 10) / 10);
}
