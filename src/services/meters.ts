/** Meters: one fuel at one facility, read against one weather station. */
import { newId } from '../store/ids.js';
import type { MeterRow } from '../store/schema.js';
import { notFound, DomainError } from '../domain/errors.js';
import { audit, inTransaction, type Executor, type ServiceContext } from './context.js';
import { getFacilityRow } from './facilities.js';
import { bumpMeterVersions } from '../store/data-versions.js';
import { oldestFirstPage, PAGE_SIZES, type PageInfo, type PageRequest } from './paging.js';

export interface Meter {
  id: string;
  facilityId: string;
  name: string;
  fuel: string;
  unit: string;
  weatherStationId: string;
  createdAt: string;
}

export function toMeter(row: MeterRow): Meter {
  return {
    id: row.id,
    facilityId: row.facility_id,
    name: row.name,
    fuel: row.fuel,
    unit: row.unit,
    weatherStationId: row.weather_station_id,
    createdAt: row.created_at,
  };
}

export async function createMeter(
  ctx: ServiceContext,
  facilityId: string,
  input: { name: string; fuel: string; unit: string; weatherStationId: string },
): Promise<Meter> {
  const organisationId = ctx.principal.organisationId;
  return inTransaction(ctx, async (trx) => {
    await getFacilityRow(trx, organisationId, facilityId);
    const station = await trx
      .selectFrom('weather_stations')
      .select('id')
      .where('id', '=', input.weatherStationId)
      .where('organisation_id', '=', organisationId)
      .executeTakeFirst();
    if (!station) {
      throw new DomainError(
        'invalid',
        `weatherStationId: no weather station ${input.weatherStationId} in this organisation`,
        [{ field: 'weatherStationId', message: 'no such weather station' }],
      );
    }
    const row: MeterRow = {
      id: newId('mtr'),
      organisation_id: organisationId,
      facility_id: facilityId,
      name: input.name,
      fuel: input.fuel,
      unit: input.unit,
      weather_station_id: input.weatherStationId,
      created_at: ctx.now,
    };
    await trx.insertInto('meters').values(row).execute();
    await bumpMeterVersions(trx, [row.id]);
    const meter = toMeter(row);
    await audit(trx, ctx, { action: 'create', entityType: 'meter', entityId: row.id, after: meter });
    return meter;
  });
}

/** The organisation's meter, or a 404 (another organisation's id included). */
export async function getMeterRow(db: Executor, organisationId: string, id: string): Promise<MeterRow> {
  const row = await db
    .selectFrom('meters')
    .selectAll()
    .where('id', '=', id)
    .where('organisation_id', '=', organisationId)
    .executeTakeFirst();
  if (!row) throw notFound('meter', id);
  return row;
}

/** Every meter of the organisation, or of one of its facilities, oldest first, a page at a time. */
export async function listOrganisationMeters(
  db: Executor,
  organisationId: string,
  query: { facilityId?: string } & Partial<PageRequest> = {},
): Promise<{ meters: Meter[] } & PageInfo> {
  const request = { limit: query.limit ?? PAGE_SIZES.records.default, cursor: query.cursor };
  if (query.facilityId !== undefined) return listMeters(db, organisationId, query.facilityId, request);
  const { rows, page } = await oldestFirstPage(
    db.selectFrom('meters').selectAll().where('organisation_id', '=', organisationId),
    request,
    'meters',
  );
  return { meters: rows.map(toMeter), ...page };
}

/** The facility's meters, oldest first, a page at a time. */
export async function listMeters(
  db: Executor,
  organisationId: string,
  facilityId: string,
  request: PageRequest = { limit: PAGE_SIZES.records.default },
): Promise<{ meters: Meter[] } & PageInfo> {
  await getFacilityRow(db, organisationId, facilityId);
  const { rows, page } = await oldestFirstPage(
    db.selectFrom('meters').selectAll().where('facility_id', '=', facilityId),
    request,
    'meters',
  );
  return { meters: rows.map(toMeter), ...page };
}
