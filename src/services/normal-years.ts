/**
 * A station's normal year: 365 daily mean temperatures (02-29 left out) that
 * stand for the long-term typical weather, with a note of where they come
 * from. Normalised savings apply the baseline and the reporting-period model
 * to it. Replaced whole by each PUT; its content hash lets a report name the
 * exact year it used.
 */
import {
  checkNormalYear,
  NORMAL_YEAR_DAYS,
  normalYearFromHistory,
  ShortHistoryError,
  type TemperatureUnit,
} from '../engine/index.js';
import { canonicalJson, sha256Hex } from '../lib/canonical-json.js';
import { DomainError, notFound, fieldErrors, MAX_LISTED_ERRORS } from '../domain/errors.js';
import { audit, inTransaction, type Executor, type ServiceContext, type Tx } from './context.js';
import { getStationRow } from './weather-stations.js';
import type { RecordLocator } from './readings.js';
import { bumpStationMeterVersions } from '../store/data-versions.js';
import {
  ArchiveFormatError,
  publishedNormalsSource,
  readDailyNormalsCsv,
  type NormalsFormat,
} from '../station-archives/index.js';

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
      const errors = problems.map((p) => ({
        field: p.index >= 0 ? locate(p.index, p.field) : p.field,
        message: p.message,
      }));
      throw fieldErrors('invalid', errors, MAX_LISTED_ERRORS);
    }
    const byDay = new Map(input.days.map((d) => [d.day, d.temp]));
    const temps = NORMAL_YEAR_DAYS.map((day) => byDay.get(day)!);
    return storeNormalYear(trx, ctx, station, input.source, temps);
  });
}

/**
 * Build the station's normal year from its own stored days (observed and
 * filled alike; the source says how many were filled) over
 * [fromYear, toYear], and store it as any normal year: replaced whole, with
 * its content hash, on the audit trail.
 */
export async function normalYearFromStationHistory(
  ctx: ServiceContext,
  stationId: string,
  input: { fromYear: number; toYear: number; windowDays?: number },
): Promise<NormalYear> {
  if (input.toYear < input.fromYear) {
    throw new DomainError('invalid', 'toYear: must not be before fromYear', [
      { field: 'toYear', message: 'before fromYear' },
    ]);
  }
  return inTransaction(ctx, async (trx) => {
    const station = await getStationRow(trx, ctx.principal.organisationId, stationId);
    const rows = await trx
      .selectFrom('weather_observations')
      .select(['date', 'temp', 'fill_method'])
      .where('station_id', '=', station.id)
      .where('date', '>=', `${input.fromYear}-01-01`)
      .where('date', '<', `${input.toYear + 1}-01-01`)
      .orderBy('date')
      .execute();
    let built;
    try {
      built = normalYearFromHistory(rows, {
        fromYear: input.fromYear,
        toYear: input.toYear,
        ...(input.windowDays !== undefined ? { windowDays: input.windowDays } : {}),
      });
    } catch (error) {
      if (!(error instanceof ShortHistoryError)) throw error;
      throw new DomainError('unprocessable', `station ${station.id}: ${error.message}`);
    }
    const filled = rows.filter((r) => r.fill_method !== null).length;
    const years = input.fromYear === input.toYear ? `${input.fromYear}` : `${input.fromYear}–${input.toYear}`;
    const source =
      `built from the station's own record: mean of each calendar day over ${built.years} year(s) ${years} ` +
      `(${built.daysUsed} days, ${filled} of them filled), 29 February folded into 28 February, ` +
      `smoothed by a centred ${built.windowDays}-day moving mean`;
    const temps = built.temps.map((t) => Math.round(t * 1e6) / 1e6);
    return storeNormalYear(trx, ctx, station, source, temps);
  });
}

export interface PublishedNormalsInput {
  format: NormalsFormat;
  /** The file's text. */
  text: string;
  /** When given, the file must carry this station id (the archive's, not the ledger's). */
  archiveStationId?: string;
  /** The unit of the file's values (default F, as the published files are). */
  fileUnit?: TemperatureUnit;
}

/**
 * Store a station's normal year from published daily normals (NOAA's daily
 * normals CSV, src/station-archives/daily-normals-csv.ts), as any normal
 * year: replaced whole, with a source naming the file's station and how each
 * day was taken, on the audit trail. A file that does not follow its layout
 * stores nothing and is refused naming its line and column.
 */
export async function normalYearFromPublishedNormals(
  ctx: ServiceContext,
  stationId: string,
  input: PublishedNormalsInput,
): Promise<NormalYear> {
  return inTransaction(ctx, async (trx) => {
    const station = await getStationRow(trx, ctx.principal.organisationId, stationId);
    let year;
    try {
      year = readDailyNormalsCsv(input.text, {
        unit: station.temperature_unit,
        ...(input.fileUnit !== undefined ? { fileUnit: input.fileUnit } : {}),
        ...(input.archiveStationId !== undefined ? { expectedStationId: input.archiveStationId } : {}),
      });
    } catch (error) {
      if (!(error instanceof ArchiveFormatError)) throw error;
      throw new DomainError('invalid', `${input.format} file, ${error.message}`, [
        { field: error.place, message: error.detail },
      ]);
    }
    const problems = checkNormalYear(year.days, station.temperature_unit);
    if (problems.length > 0) {
      const errors = problems.map((p) => ({
        field: p.index >= 0 ? `day ${year.days[p.index]!.day}` : p.field,
        message: p.message,
      }));
      throw fieldErrors('invalid', errors, MAX_LISTED_ERRORS);
    }
    const source = publishedNormalsSource(year, station.temperature_unit);
    return storeNormalYear(
      trx,
      ctx,
      station,
      source,
      year.days.map((d) => d.temp),
    );
  });
}

/** Replace the station's normal year with these 365 temperatures, on the audit trail. */
async function storeNormalYear(
  trx: Tx,
  ctx: ServiceContext,
  station: { id: string; temperature_unit: TemperatureUnit },
  source: string,
  temps: number[],
): Promise<NormalYear> {
  const row = {
    station_id: station.id,
    source,
    temps_json: canonicalJson(temps),
    content_hash: normalYearHash(source, temps),
    updated_at: ctx.now,
  };
  const old = await trx
    .selectFrom('normal_years')
    .select(['source', 'content_hash'])
    .where('station_id', '=', station.id)
    .executeTakeFirst();
  if (old) await trx.updateTable('normal_years').set(row).where('station_id', '=', station.id).execute();
  else await trx.insertInto('normal_years').values(row).execute();
  await bumpStationMeterVersions(trx, station.id);
  await audit(trx, ctx, {
    action: 'put-normal-year',
    entityType: 'weather-station',
    entityId: station.id,
    before: old ? { source: old.source, contentHash: old.content_hash } : null,
    after: { source: row.source, contentHash: row.content_hash, temps },
  });
  return toNormalYear(row, station.temperature_unit);
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
