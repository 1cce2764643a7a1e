/** Meters: one fuel at one facility, read against one weather station. */
import { newId } from '../store/ids.js';
import type { MeterRow } from '../store/schema.js';
import { notFound, DomainError } from '../domain/errors.js';
import { audit, inTransaction, type Executor, type ServiceContext } from './context.js';
import { getFacilityRow } from './facilities.js';

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
      throw new DomainError('invalid', `weatherStationId: no weather station ${input.weatherStationId} in this organisation`, [
        { field: 'weatherStationId', message: 'no such weather station' },
      ]);
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

export async function listMeters(db: Executor, organisationId: string, facilityId: string): Promise<Meter[]> {
  await getFacilityRow(db, organisationId, facilityId);
  const rows = await db
    .selectFrom('meters')
    .selectAll()
    .where('facility_id', '=', facilityId)
    .orderBy('created_at')
    .orderBy('id')
    .execute();
  return rows.map(toMeter);
}
