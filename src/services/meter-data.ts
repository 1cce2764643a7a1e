/**
 * A meter's readings and its station's daily weather, loaded as the engine
 * takes them (Reading[], DailyTemperature[]). Queries read only the window
 * asked for, so a savings request touches the reporting period and nothing
 * else.
 */
import type { DailyTemperature, FillMethod, Reading, TemperatureUnit } from '../engine/index.js';
import { notFound } from '../domain/errors.js';
import type { Executor } from './context.js';

export interface ReadingWindow {
  /** Only readings with start ≥ this date. */
  startOnOrAfter?: string;
  /** Only readings with end ≤ this date (end is exclusive, so a reading ending here lies inside). */
  endOnOrBefore?: string;
  /** Only readings with start < this date. */
  startBefore?: string;
  /** Only readings with end > this date. */
  endAfter?: string;
}

/** The meter's readings in the window, in start order. */
export async function loadReadings(db: Executor, meterId: string, window: ReadingWindow = {}): Promise<Reading[]> {
  let query = db
    .selectFrom('readings')
    .select(['period_start', 'period_end', 'quantity', 'estimated'])
    .where('meter_id', '=', meterId);
  if (window.startOnOrAfter !== undefined) query = query.where('period_start', '>=', window.startOnOrAfter);
  if (window.endOnOrBefore !== undefined) query = query.where('period_end', '<=', window.endOnOrBefore);
  if (window.startBefore !== undefined) query = query.where('period_start', '<', window.startBefore);
  if (window.endAfter !== undefined) query = query.where('period_end', '>', window.endAfter);
  const rows = await query.orderBy('period_start').orderBy('period_end').execute();
  return rows.map((row) => ({
    start: row.period_start,
    end: row.period_end,
    quantity: row.quantity,
    estimated: row.estimated === 1,
  }));
}

/** Daily mean temperatures of the station on [from, to), in date order. */
export async function loadDailyWeather(
  db: Executor,
  stationId: string,
  from: string,
  to: string,
): Promise<DailyTemperature[]> {
  const rows = await db
    .selectFrom('weather_observations')
    .select(['date', 'temp'])
    .where('station_id', '=', stationId)
    .where('date', '>=', from)
    .where('date', '<', to)
    .orderBy('date')
    .execute();
  return rows.map((row) => ({ date: row.date, temp: row.temp }));
}

/** The daily weather covering every day of `readings` (empty when there are none). */
export async function loadWeatherFor(
  db: Executor,
  stationId: string,
  readings: readonly Reading[],
): Promise<DailyTemperature[]> {
  const span = spanOf(readings);
  return span === null ? [] : loadDailyWeather(db, stationId, span.from, span.to);
}

/** The days [from, to) that `periods` cover together: the first start and the last end (null for none). */
export function spanOf(periods: readonly { start: string; end: string }[]): { from: string; to: string } | null {
  if (periods.length === 0) return null;
  let from = periods[0]!.start;
  let to = periods[0]!.end;
  for (const period of periods) {
    if (period.start < from) from = period.start;
    if (period.end > to) to = period.end;
  }
  return { from, to };
}

/** The station's observations on [from, to), in date order: each day's temperature and how it was filled, if it was. */
export function stationObservations(db: Executor, stationId: string, from: string, to: string) {
  return db
    .selectFrom('weather_observations')
    .select(['date', 'temp', 'fill_method'])
    .where('station_id', '=', stationId)
    .where('date', '>=', from)
    .where('date', '<', to)
    .orderBy('date')
    .execute();
}

/**
 * What loadWeatherFor and loadFilledDays answer over the same days, in one
 * query: the station's daily weather over every day of `readings`, and the
 * days of it filled on record, by method.
 */
export async function loadWeatherWithFillsFor(
  db: Executor,
  stationId: string,
  readings: readonly Reading[],
): Promise<{ weather: DailyTemperature[]; filled: Map<string, FillMethod> }> {
  const weather: DailyTemperature[] = [];
  const filled = new Map<string, FillMethod>();
  const span = spanOf(readings);
  if (span === null) return { weather, filled };
  const rows = await stationObservations(db, stationId, span.from, span.to);
  for (const row of rows) {
    weather.push({ date: row.date, temp: row.temp });
    if (row.fill_method !== null) filled.set(row.date, row.fill_method);
  }
  return { weather, filled };
}

/** The temperature unit of a station of the organisation. */
export async function stationUnit(db: Executor, organisationId: string, stationId: string): Promise<TemperatureUnit> {
  const row = await db
    .selectFrom('weather_stations')
    .select('temperature_unit')
    .where('id', '=', stationId)
    .where('organisation_id', '=', organisationId)
    .executeTakeFirst();
  if (!row) throw notFound('weather station', stationId);
  return row.temperature_unit;
}
