/** A station's stored record summarised (span, per year observed/filled/missing, extremes), to judge it fit for a baseline. */
import { summariseStationRecord, type StationRecordSummary, type TemperatureUnit } from '../engine/index.js';
import type { Executor } from './context.js';
import { checkDateRange, type DateRange } from './readings.js';
import { getStationRow } from './weather-stations.js';

export async function stationRecordSummary(
  db: Executor,
  organisationId: string,
  stationId: string,
  query: DateRange = {},
): Promise<{ stationId: string; temperatureUnit: TemperatureUnit } & StationRecordSummary> {
  checkDateRange(query);
  const station = await getStationRow(db, organisationId, stationId);
  let q = db
    .selectFrom('weather_observations')
    .select(['date', 'temp', 'fill_method'])
    .where('station_id', '=', stationId);
  if (query.from !== undefined) q = q.where('date', '>=', query.from);
  if (query.to !== undefined) q = q.where('date', '<', query.to);
  const rows = await q.orderBy('date').execute();
  const summary = summariseStationRecord(
    rows.map((r) => ({ date: r.date, temp: r.temp, filled: r.fill_method })),
    station.temperature_unit,
  );
  return { stationId, temperatureUnit: station.temperature_unit, ...summary };
}
