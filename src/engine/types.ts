/**
 * Shared data shapes of the engine. Everything here is plain data: no HTTP,
 * no SQL, no files. Dates are ISO calendar dates (YYYY-MM-DD); a reading
 * covers [start, end), so `days = end − start`.
 */

/** The six changepoint shapes, named as ASHRAE Guideline 14 names them. */
export type ModelName = '1P' | '2P' | '3PC' | '3PH' | '4P' | '5P';

/** Every shape, simplest first. */
export const MODEL_NAMES: readonly ModelName[] = ['1P', '2P', '3PC', '3PH', '4P', '5P'];

/** Parameter count p of each shape, changepoints included. */
export const PARAMETER_COUNT: Readonly<Record<ModelName, number>> = {
  '1P': 1,
  '2P': 2,
  '3PC': 3,
  '3PH': 3,
  '4P': 4,
  '5P': 5,
};

export type TemperatureUnit = 'F' | 'C';

/**
 * How a baseline sees a reading's weather.
 * - 'daily': the day-resolved (variable-base degree-day) form: a reading's
 *   expected use per day is the mean over its own days of the daily
 *   changepoint response. For one-day readings it is the ordinary fit.
 * - 'mean': the reading's mean temperature is fed to the response, as if
 *   every day of the reading had that temperature.
 */
export type TemperatureForm = 'daily' | 'mean';

/** Both forms; 'daily' is the default wherever the readings carry their days' temperatures. */
export const TEMPERATURE_FORMS: readonly TemperatureForm[] = ['daily', 'mean'];

/** One meter reading (a bill, or a day of interval data). */
export interface Reading {
  start: string;
  end: string;
  quantity: number;
  estimated?: boolean;
}

/** One day of weather: the daily mean outdoor dry-bulb temperature. */
export interface DailyTemperature {
  date: string;
  temp: number;
}

/**
 * A reading aligned with its weather: the point the regression sees.
 * x = mean temperature over the period's days, y = use per day, w = days.
 */
export interface Period {
  start: string;
  end: string;
  days: number;
  quantity: number;
  usePerDay: number;
  meanTemp: number;
  /** Share of the period's days that have a temperature (0..1). */
  coverage: number;
  estimated: boolean;
  /**
   * The daily mean temperatures of the period's days that have weather, in
   * date order (alignPeriods fills it). The day-resolved form needs them;
   * periods built from a mean temperature alone leave it out and can only be
   * fitted in the mean form.
   */
  dayTemps?: readonly number[];
  /**
   * Independent variables (occupancy, production, day-type shares …) as the
   * model sees them: each one's value per day over the period (the mean of a
   * daily series over the period's days, or a per-period total divided by
   * its days: see variables.ts). Only models fitted with variables read it.
   */
  variables?: Readonly<Record<string, number>>;
}

/** A reading that could not be used, and why (never dropped silently). */
export interface ExcludedPeriod {
  start: string;
  end: string;
  /** Index of the reading in the input list. */
  index: number;
  reason: string;
}

export interface AlignedPeriods {
  periods: Period[];
  excluded: ExcludedPeriod[];
}
