/**
 * A meter's data version (migration 0008): a random token that every write
 * able to change the meter's savings replaces inside its own transaction:
 * its readings, its station's weather and normal year, its adjustments
 * (made or withdrawn), its rates, its baselines (frozen, superseded) and its
 * facility's contract. A cached savings document is keyed on the token, so
 * it lives exactly as long as the data it was computed from.
 */
import { randomUUID } from 'node:crypto';
import type { Transaction } from 'kysely';
import type { Database } from './schema.js';
import type { Executor } from './executor.js';

/** Give the meters new tokens (a meter without a row gets one). */
export async function bumpMeterVersions(trx: Transaction<Database>, meterIds: readonly string[]): Promise<void> {
  if (meterIds.length === 0) return;
  const version = randomUUID();
  const unique = [...new Set(meterIds)];
  await trx
    .insertInto('meter_data_versions')
    .values(unique.map((meter_id) => ({ meter_id, version })))
    .onConflict((oc) => oc.column('meter_id').doUpdateSet({ version }))
    .execute();
}

/** New tokens for every meter read against the station (its weather or normal year changed): one statement. */
export async function bumpStationMeterVersions(trx: Transaction<Database>, stationId: string): Promise<void> {
  await trx
    .insertInto('meter_data_versions')
    .columns(['meter_id', 'version'])
    .expression((eb) =>
      eb
        .selectFrom('meters')
        .select((s) => ['id', s.val(randomUUID()).as('version')])
        .where('weather_station_id', '=', stationId),
    )
    .onConflict((oc) => oc.column('meter_id').doUpdateSet((eb) => ({ version: eb.ref('excluded.version') })))
    .execute();
}

/** New tokens for every meter of the facility (its contract changed): one statement. */
export async function bumpFacilityMeterVersions(trx: Transaction<Database>, facilityId: string): Promise<void> {
  await trx
    .insertInto('meter_data_versions')
    .columns(['meter_id', 'version'])
    .expression((eb) =>
      eb
        .selectFrom('meters')
        .select((s) => ['id', s.val(randomUUID()).as('version')])
        .where('facility_id', '=', facilityId),
    )
    .onConflict((oc) => oc.column('meter_id').doUpdateSet((eb) => ({ version: eb.ref('excluded.version') })))
    .execute();
}

/**
 * The meter's current token, looked up with the caller's organisation:
 * undefined when the meter is not the organisation's, null when it has no
 * token yet (nothing may then be cached for it).
 */
export async function meterVersion(
  db: Executor,
  organisationId: string,
  meterId: string,
): Promise<string | null | undefined> {
  const row = await db
    .selectFrom('meters')
    .leftJoin('meter_data_versions', 'meter_data_versions.meter_id', 'meters.id')
    .select('meter_data_versions.version')
    .where('meters.id', '=', meterId)
    .where('meters.organisation_id', '=', organisationId)
    .executeTakeFirst();
  return row === undefined ? undefined : row.version;
}
