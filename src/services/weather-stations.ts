/** Weather stations: a named source of daily temperatures in one unit. */
import type { TemperatureUnit } from '../engine/index.js';
import { newId } from '../store/ids.js';
import { notFound } from '../domain/errors.js';
import { audit, inTransaction, type Executor, type ServiceContext } from './context.js';
import { oldestFirstPage, PAGE_SIZES, type PageInfo, type PageRequest } from './paging.js';

export interface WeatherStation {
  id: string;
  name: string;
  temperatureUnit: TemperatureUnit;
  createdAt: string;
}

type StationRow = { id: string; name: string; temperature_unit: TemperatureUnit; created_at: string };

export function toStation(row: StationRow): WeatherStation {
  return { id: row.id, name: row.name, temperatureUnit: row.temperature_unit, createdAt: row.created_at };
}

export async function createStation(
  ctx: ServiceContext,
  input: { name: string; temperatureUnit: TemperatureUnit },
): Promise<WeatherStation> {
  const row = {
    id: newId('wst'),
    organisation_id: ctx.principal.organisationId,
    name: input.name,
    temperature_unit: input.temperatureUnit,
    created_at: ctx.now,
  };
  return inTransaction(ctx, async (trx) => {
    await trx.insertInto('weather_stations').values(row).execute();
    const station = toStation(row);
    await audit(trx, ctx, { action: 'create', entityType: 'weather-station', entityId: row.id, after: station });
    return station;
  });
}

/** The organisation's station, or a 404 (another organisation's id included). */
export async function getStationRow(db: Executor, organisationId: string, id: string) {
  const row = await db
    .selectFrom('weather_stations')
    .selectAll()
    .where('id', '=', id)
    .where('organisation_id', '=', organisationId)
    .executeTakeFirst();
  if (!row) throw notFound('weather station', id);
  return row;
}

/** The organisation's weather stations, oldest first, a page at a time. */
export async function listStations(
  db: Executor,
  organisationId: string,
  request: PageRequest = { limit: PAGE_SIZES.records.default },
): Promise<{ stations: WeatherStation[] } & PageInfo> {
  const { rows, page } = await oldestFirstPage(
    db.selectFrom('weather_stations').selectAll().where('organisation_id', '=', organisationId),
    request,
    'stations',
  );
  return { stations: rows.map(toStation), ...page };
}
