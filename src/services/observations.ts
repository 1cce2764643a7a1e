/**
 * Daily weather observations of a station: a batch is checked whole in the
 * station's unit, upserted by date in one transaction or not at all, and may
 * not touch a day inside the window of a frozen baseline of any meter read
 * against the station.
 */
import { addDays, checkWeather, type TemperatureUnit } from '../engine/index.js';
import { PostgresAdapter, sql, type Insertable } from 'kysely';
import type { FillMethod, WeatherObservationsTable } from '../store/schema.js';
import { DomainError, type FieldError, fieldErrors, MAX_LISTED_ERRORS } from '../domain/errors.js';
import { MAX_RECORDS_PER_BATCH } from '../domain/limits.js';
import { audit, inTransaction, type Executor, type ServiceContext, type Tx } from './context.js';
import { getStationRow } from './weather-stations.js';
import { assertOutsideFrozenWindows, frozenWindowsForStation } from './frozen-windows.js';
import { checkDateRange, jsonLocator, type DateRange, type RecordLocator } from './readings.js';
import { bumpStationMeterVersions } from '../store/data-versions.js';
import { decodeCursor, PAGE_SIZES, pageOf, type PageInfo, type PageRequest } from './paging.js';

/** Rows per upsert statement: 6 columns × 1000 stays far below SQLite's 32,766 parameters. */
const UPSERT_CHUNK_ROWS = 1000;

/** A day given as its mean, or as its minimum and maximum. */
export interface ObservationInput {
  date: string;
  temp?: number;
  tmin?: number;
  tmax?: number;
}

export interface Observation {
  date: string;
  /** Daily mean: as given, or (tmin + tmax)/2. */
  temp: number;
  tmin: number | null;
  tmax: number | null;
}

/** A stored day: observed (filled null) or filled on record, with what it was filled from. */
export interface ListedObservation extends Observation {
  filled: FillMethod | null;
  fillNote: string | null;
}

export interface PutObservationsResult {
  stationId: string;
  received: number;
  created: number;
  updated: number;
  unchanged: number;
}

type ObservationRow = Insertable<WeatherObservationsTable>;
type AuditedValues = { temp: number; tmin?: number | null; tmax?: number | null; filled?: FillMethod };
type StoredObservation = Observation & { fill_method: FillMethod | null };

export async function putObservations(
  ctx: ServiceContext,
  stationId: string,
  input: { observations: readonly ObservationInput[] },
  locate: RecordLocator = jsonLocator('observations'),
): Promise<PutObservationsResult> {
  return inTransaction(ctx, async (trx) => {
    const station = await getStationRow(trx, ctx.principal.organisationId, stationId);
    const days = checkObservations(input.observations, station.temperature_unit, locate);
    return writeObservations(trx, ctx, stationId, days, locate, { action: 'upsert-observations' });
  });
}

/** How a batch of days enters the audit trail: its action, and anything the row should say beside the values. */
export interface ObservationAudit {
  action: string;
  details?: Record<string, unknown>;
}

/**
 * Upsert checked days inside the caller's transaction: unchanged days are
 * counted and left alone, no day inside a frozen window may change, and one
 * audit row (when anything changed) carries before and after of every day
 * written. A day given here is observed: a fill stored for it is replaced.
 */
export async function writeObservations(
  trx: Tx,
  ctx: ServiceContext,
  stationId: string,
  days: readonly Observation[],
  locate: RecordLocator,
  auditAs: ObservationAudit,
): Promise<PutObservationsResult> {
  const stored = await storedBetween(trx, stationId, days);
  const writes: { index: number; observation: Observation }[] = [];
  const before: Record<string, AuditedValues> = {};
  let created = 0;
  let unchanged = 0;
  days.forEach((observation, index) => {
    const old = stored.get(observation.date);
    if (old && old.fill_method === null && sameObservation(old, observation)) {
      unchanged++;
      return;
    }
    if (old) before[old.date] = compact(old);
    else created++;
    writes.push({ index, observation });
  });

  assertOutsideFrozenWindows(
    await frozenWindowsForStation(trx, stationId),
    writes.map(({ index, observation }) => ({ index, start: observation.date, end: addDays(observation.date, 1) })),
    (write) => locate(write.index),
    'these observations',
  );

  await upsertChunked(
    trx,
    writes.map(({ observation }) => ({
      station_id: stationId,
      date: observation.date,
      temp: observation.temp,
      tmin: observation.tmin,
      tmax: observation.tmax,
      updated_at: ctx.now,
      fill_method: null,
      fill_note: null,
    })),
  );
  const result: PutObservationsResult = {
    stationId,
    received: days.length,
    created,
    updated: writes.length - created,
    unchanged,
  };
  // Nothing changed, nothing written: no audit row.
  if (writes.length > 0) {
    const after: Record<string, AuditedValues> = {};
    for (const { observation } of writes) after[observation.date] = compact(observation);
    await audit(trx, ctx, {
      action: auditAs.action,
      entityType: 'weather-station',
      entityId: stationId,
      before,
      after: auditAs.details ? { ...auditAs.details, days: after } : after,
    });
  }
  return result;
}

/**
 * Every record checked in the station's unit: one form of temperature,
 * tmin ≤ tmax, plausible values, real and unrepeated dates. Returns the days
 * with their means.
 */
export function checkObservations(
  records: readonly ObservationInput[],
  unit: TemperatureUnit,
  locate: RecordLocator,
): Observation[] {
  if (records.length === 0) {
    throw new DomainError('invalid', 'observations: at least one observation is needed', [
      { field: 'observations', message: 'empty' },
    ]);
  }
  if (records.length > MAX_RECORDS_PER_BATCH) {
    throw new DomainError(
      'invalid',
      `observations: at most ${MAX_RECORDS_PER_BATCH} per request (got ${records.length}); send smaller batches`,
      [{ field: 'observations', message: 'too many' }],
    );
  }
  const errors: { index: number; error: FieldError }[] = [];
  const problem = (index: number, field: string, message: string) =>
    errors.push({ index, error: { field: locate(index, field), message } });
  const days: Observation[] = [];
  /** Records whose mean the engine judges: the ones given as temp. */
  const givenAsMean = new Set<number>();
  /** Each given minimum and maximum, judged by the engine as a temperature of its own. */
  const extremes: { date: string; temp: number }[] = [];
  const extremeOwners: { index: number; field: 'tmin' | 'tmax' }[] = [];
  records.forEach((record, index) => {
    const { date, temp, tmin, tmax } = record;
    if (temp !== undefined) {
      if (tmin !== undefined || tmax !== undefined)
        problem(index, 'temp', 'give either temp or tmin and tmax, not both');
      givenAsMean.add(index);
      days.push({ date, temp, tmin: null, tmax: null });
      return;
    }
    if (tmin === undefined && tmax === undefined)
      problem(index, 'temp', 'a temperature is needed: temp, or tmin and tmax');
    else if (tmin === undefined) problem(index, 'tmin', 'tmin is needed with tmax');
    else if (tmax === undefined) problem(index, 'tmax', 'tmax is needed with tmin');
    else {
      extremes.push({ date, temp: tmin }, { date, temp: tmax });
      extremeOwners.push({ index, field: 'tmin' }, { index, field: 'tmax' });
      if (tmin > tmax) problem(index, 'tmin', `tmin ${tmin} is above tmax ${tmax}`);
    }
    // The mean of the day's minimum and maximum: common practice for daily means.
    days.push({ date, temp: ((tmin ?? NaN) + (tmax ?? NaN)) / 2, tmin: tmin ?? null, tmax: tmax ?? null });
  });
  for (const found of checkWeather(days, unit)) {
    if (found.field === 'temp' && !givenAsMean.has(found.index)) continue;
    const related = found.relatedIndex === undefined ? '' : ` (${locate(found.relatedIndex)})`;
    problem(found.index, found.field, `${found.message}${related}`);
  }
  for (const found of checkWeather(extremes, unit)) {
    if (found.field !== 'temp') continue;
    const owner = extremeOwners[found.index]!;
    problem(owner.index, owner.field, found.message);
  }
  if (errors.length > 0) {
    const listed = errors.sort((a, b) => a.index - b.index).map((e) => e.error);
    throw fieldErrors('invalid', listed, MAX_LISTED_ERRORS);
  }
  return days;
}

async function storedBetween(
  trx: Tx,
  stationId: string,
  days: readonly Observation[],
): Promise<Map<string, StoredObservation>> {
  let first = days[0]!.date;
  let last = first;
  for (const day of days) {
    if (day.date < first) first = day.date;
    if (day.date > last) last = day.date;
  }
  const rows = await trx
    .selectFrom('weather_observations')
    .select(['date', 'temp', 'tmin', 'tmax', 'fill_method'])
    .where('station_id', '=', stationId)
    .where('date', '>=', first)
    .where('date', '<=', last)
    .execute();
  return new Map(rows.map((row) => [row.date, row]));
}

function sameObservation(a: Observation, b: Observation): boolean {
  return a.temp === b.temp && a.tmin === b.tmin && a.tmax === b.tmax;
}

/** The audit keeps tmin and tmax only where they were given, and a fill's method where the day was filled. */
function compact(observation: Observation & { fill_method?: FillMethod | null }): AuditedValues {
  const { temp, tmin, tmax, fill_method } = observation;
  const values: AuditedValues = tmin === null && tmax === null ? { temp } : { temp, tmin, tmax };
  return fill_method ? { ...values, filled: fill_method } : values;
}

/** Writes observed or filled days; every meter on a station whose weather changed gets a new data version (its cached savings go stale). */
export async function upsertChunked(trx: Tx, rows: readonly ObservationRow[]): Promise<void> {
  for (const stationId of new Set(rows.map((row) => row.station_id))) await bumpStationMeterVersions(trx, stationId);
  if (rows.length > 0 && trx.getExecutor().adapter instanceof PostgresAdapter) return upsertByUnnest(trx, rows);
  for (let i = 0; i < rows.length; i += UPSERT_CHUNK_ROWS) {
    await trx
      .insertInto('weather_observations')
      .values(rows.slice(i, i + UPSERT_CHUNK_ROWS))
      .onConflict((oc) =>
        oc.columns(['station_id', 'date']).doUpdateSet((eb) => ({
          temp: eb.ref('excluded.temp'),
          tmin: eb.ref('excluded.tmin'),
          tmax: eb.ref('excluded.tmax'),
          updated_at: eb.ref('excluded.updated_at'),
          fill_method: eb.ref('excluded.fill_method'),
          fill_note: eb.ref('excluded.fill_note'),
        })),
      )
      .execute();
  }
}

/**
 * PostgreSQL: the whole batch as one statement, its columns travelling as
 * arrays unnested in SQL (as readings-postgres.ts does for readings), in
 * place of a multi-row VALUES statement per thousand rows.
 */
async function upsertByUnnest(trx: Tx, rows: readonly ObservationRow[]): Promise<void> {
  const column = <K extends keyof ObservationRow>(key: K) => rows.map((row) => row[key] ?? null);
  await sql`
    insert into weather_observations (station_id, date, temp, tmin, tmax, updated_at, fill_method, fill_note)
    select * from unnest(${column('station_id')}::text[], ${column('date')}::text[], ${column('temp')}::float8[],
                         ${column('tmin')}::float8[], ${column('tmax')}::float8[], ${column('updated_at')}::text[],
                         ${column('fill_method')}::text[], ${column('fill_note')}::text[])
    on conflict (station_id, date) do update set
      temp = excluded.temp, tmin = excluded.tmin, tmax = excluded.tmax, updated_at = excluded.updated_at,
      fill_method = excluded.fill_method, fill_note = excluded.fill_note`.execute(trx);
}

/** Observations on dates in [from, to), by date, a page at a time. */
export async function listObservations(
  db: Executor,
  organisationId: string,
  stationId: string,
  query: DateRange & Partial<PageRequest> = {},
): Promise<{ stationId: string; temperatureUnit: TemperatureUnit; observations: ListedObservation[] } & PageInfo> {
  checkDateRange(query);
  const request = { limit: query.limit ?? PAGE_SIZES.series.default, cursor: query.cursor };
  const after = decodeCursor('observations', request.cursor, 's');
  const station = await getStationRow(db, organisationId, stationId);
  let q = db
    .selectFrom('weather_observations')
    .select(['date', 'temp', 'tmin', 'tmax', 'fill_method', 'fill_note'])
    .where('station_id', '=', stationId);
  if (query.from !== undefined) q = q.where('date', '>=', query.from);
  if (query.to !== undefined) q = q.where('date', '<', query.to);
  if (after) q = q.where('date', '>', after[0] as string);
  const fetched = await q
    .orderBy('date')
    .limit(request.limit + 1)
    .execute();
  const { rows, page } = pageOf(fetched, request, 'observations', (row) => [row.date]);
  const observations = rows.map(({ fill_method, fill_note, ...day }) => ({
    ...day,
    filled: fill_method,
    fillNote: fill_note,
  }));
  return { stationId, temperatureUnit: station.temperature_unit, ...page, observations };
}
