/**
 * A station's normal year: 365 daily mean temperatures (02-29 left out) that
 * stand for the long-term typical weather, with a note of where they come
 * from. Normalised savings apply the baseline and the reporting-period model
 * to it. Replaced whole by each PUT; its content hash lets a report name the
 * exact year it used.
 */
import { checkNormalYear, NORMAL_YEAR_DAYS, type TemperatureUnit } from '../engine/index.js';
import { canonicalJson, sha256Hex } from '../lib/canonical-json.js';
import { notFound, fieldErrors, MAX_LISTED_ERRORS } from '../domain/errors.js';
import { audit, inTransaction, type Executor, type ServiceContext } from './context.js';
import { getStationRow } from './weather-stations.js';
import type { RecordLocator } from './readings.js';

export interface NormalYear {
  stationId: string;
  temperatureUnit: TemperatureUnit;
  source: string;
  contentHash: string;
  days: { day: string; temp: number }[];
  updatedAt: string;
}

/** The hash of a normal year: its source and its 365 temperatures in day order. */
export function normalYearHash(source: string, temps: readonly number[]): string {
  return sha256Hex(canonicalJson({ source, temps }));
}

export async function putNormalYear(
  ctx: ServiceContext,
  stationId: string,
  input: { source: string; days: readonly { day: string; temp: number }[] },
  locate: RecordLocator,
): Promise<NormalYear> {
  const organisationId = ctx.principal.organisationId;
  return inTransaction(ctx, async (trx) => {
    const station = await getStationRow(trx, organisationId, stationId);
    const problems = checkNormalYear(input.days, station.temperature_unit);
    if (problems.length > 0) {
      const errors = problems.map((p) => ({ field: p.index >= 0 ? locate(p.index, p.field) : p.field, message: p.message }));
      throw fieldErrors('invalid', errors, MAX_LISTED_ERRORS);
    }
    const byDay = new Map(input.days.map((d) => [d.day, d.temp]));
    const temps = NORMAL_YEAR_DAYS.map((day) => byDay.get(day)!);
    const row = {
      station_id: station.id,
      source: input.source,
      temps_json: canonicalJson(temps),
      content_hash: normalYearHash(input.source, temps),
      updated_at: ctx.now,
    };
    const old = await trx
      .selectFrom('normal_years')
      .select(['source', 'content_hash'])
      .where('station_id', '=', station.id)
      .executeTakeFirst();
    if (old) await trx.updateTable('normal_years').set(row).where('station_id', '=', station.id).execute();
    else await trx.insertInto('normal_years').values(row).execute();
    await audit(trx, ctx, {
      action: 'put-normal-year',
      entityType: 'weather-station',
      entityId: station.id,
      before: old ? { source: old.source, contentHash: old.content_hash } : null,
      after: { source: row.source, contentHash: row.content_hash, temps },
    });
    return toNormalYear(row, station.temperature_unit);
  });
}

export async function getNormalYear(db: Executor, organisationId: string, stationId: string): Promise<NormalYear> {
  const station = await getStationRow(db, organisationId, stationId);
  const row = await db.selectFrom('normal_years').selectAll().where('station_id', '=', station.id).executeTakeFirst();
  if (!row) throw notFound('normal year of weather station', stationId);
  return toNormalYear(row, station.temperature_unit);
}

function toNormalYear(
  row: { station_id: string; source: string; temps_json: string; content_hash: string; updated_at: string },
  temperatureUnit: TemperatureUnit,
): NormalYear {
  const temps = JSON.parse(row.temps_json) as number[];
  return {
    stationId: row.station_id,
    temperatureUnit,
    source: row.source,
    contentHash: row.content_hash,
    days: NORMAL_YEAR_DAYS.map((day, i) => ({ day, temp: temps[i]! })),
    updatedAt: row.updated_at,
  };
}
