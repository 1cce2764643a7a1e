/**
 * Filling a station's gaps on record: the engine plans the fill (short gaps
 * by interpolation, longer ones from a second station's fitted line, the
 * rest left empty); this writes the filled days, each flagged with its
 * method and source, in one transaction with one audit row. Observed days
 * are never touched, days filled before stay as they are, and no filled day
 * may land inside the window of a frozen baseline.
 */
import {
  addDays,
  celsiusToFahrenheit,
  checkWeather,
  daysBetween,
  DEFAULT_MAX_INTERPOLATION_DAYS,
  DEFAULT_MIN_OVERLAP_DAYS,
  fahrenheitToCelsius,
  planGapFill,
  type FilledDay,
  type StationOffset,
  type TemperatureUnit,
} from '../engine/index.js';
import { DomainError } from '../domain/errors.js';
import { audit, inTransaction, type Executor, type ServiceContext } from './context.js';
import { assertOutsideFrozenWindows, frozenWindowsForStation } from './frozen-windows.js';
import { upsertChunked } from './observations.js';
import { MAX_RECORDS_PER_BATCH } from '../domain/limits.js';
import { getStationRow } from './weather-stations.js';
import { stationObservations } from './meter-data.js';

export interface GapFillInput {
  from: string;
  to: string;
  maxInterpolationDays?: number;
  secondStationId?: string;
  minOverlapDays?: number;
}

export interface GapFillResult {
  stationId: string;
  from: string;
  to: string;
  settings: { maxInterpolationDays: number; minOverlapDays: number; secondStationId: string | null };
  /** Runs of days without an observation in the window. */
  gaps: number;
  filled: { interpolation: number; secondStation: number };
  /** Days filled before, left as they are. */
  alreadyFilled: number;
  /** Days still without a temperature. */
  leftEmpty: string[];
  offset: (StationOffset & { secondStationId: string }) | null;
  /** Why the second station was not used, when one was named. */
  offsetRefused: string | null;
  days: FilledDay[];
}

/** How far around the window the second station's overlap is taken (a year each way: the offset follows the seasons). */
const OVERLAP_MARGIN_DAYS = 365;

export async function fillWeatherGaps(
  ctx: ServiceContext,
  stationId: string,
  input: GapFillInput,
): Promise<GapFillResult> {
  const span = daysBetween(input.from, input.to);
  if (span <= 0)
    throw new DomainError('invalid', 'to: must be after from', [{ field: 'to', message: 'must be after from' }]);
  if (span > MAX_RECORDS_PER_BATCH) {
    throw new DomainError(
      'invalid',
      `to: at most ${MAX_RECORDS_PER_BATCH} days per fill (got ${span}); fill in parts`,
      [{ field: 'to', message: 'window too long' }],
    );
  }
  const maxInterpolationDays = input.maxInterpolationDays ?? DEFAULT_MAX_INTERPOLATION_DAYS;
  const minOverlapDays = input.minOverlapDays ?? DEFAULT_MIN_OVERLAP_DAYS;
  return inTransaction(ctx, async (trx) => {
    const organisationId = ctx.principal.organisationId;
    const station = await getStationRow(trx, organisationId, stationId);
    if (input.secondStationId === stationId) {
      throw new DomainError('invalid', 'secondStationId: must be another station', [
        { field: 'secondStationId', message: 'is this station' },
      ]);
    }
    const second =
      input.secondStationId === undefined ? null : await getStationRow(trx, organisationId, input.secondStationId);
    const around = { from: addDays(input.from, -OVERLAP_MARGIN_DAYS), to: addDays(input.to, OVERLAP_MARGIN_DAYS) };
    const rows = await stationObservations(trx, stationId, around.from, around.to);
    const observed = rows.filter((r) => r.fill_method === null);
    const filledBefore = new Set(rows.filter((r) => r.fill_method !== null).map((r) => r.date));
    const secondDays = second
      ? (await stationObservations(trx, second.id, around.from, around.to))
          .filter((r) => r.fill_method === null)
          .map((r) => ({ date: r.date, temp: convert(r.temp, second.temperature_unit, station.temperature_unit) }))
      : undefined;
    const plan = planGapFill(observed, input.from, input.to, {
      maxInterpolationDays,
      minOverlapDays,
      ...(second && secondDays
        ? { secondStation: { label: `station ${second.id} (${second.name})`, days: secondDays } }
        : {}),
    });
    const days = plan.filled.filter((d) => !filledBefore.has(d.date));
    const leftEmpty = plan.leftEmpty.filter((date) => !filledBefore.has(date));
    const alreadyFilled = plan.filled.length - days.length + plan.leftEmpty.length - leftEmpty.length;

    const implausible = checkWeather(days, station.temperature_unit).filter((p) => p.field === 'temp');
    if (implausible.length > 0) {
      const first = implausible[0]!;
      throw new DomainError(
        'unprocessable',
        `${days[first.index]!.date}: the fill gives ${days[first.index]!.temp}, ${first.message}; nothing stored`,
        implausible.slice(0, 100).map((p) => ({ field: days[p.index]!.date, message: p.message })),
      );
    }
    assertOutsideFrozenWindows(
      await frozenWindowsForStation(trx, stationId),
      days.map((d) => ({ date: d.date, start: d.date, end: addDays(d.date, 1) })),
      (write) => write.date,
      'this fill',
    );
    const settings = { maxInterpolationDays, minOverlapDays, secondStationId: second?.id ?? null };
    const offset = plan.offset && second ? { ...plan.offset, secondStationId: second.id } : null;
    if (days.length > 0) {
      await upsertChunked(
        trx,
        days.map((d) => ({
          station_id: stationId,
          date: d.date,
          temp: d.temp,
          tmin: null,
          tmax: null,
          updated_at: ctx.now,
          fill_method: d.method,
          fill_note: d.note,
        })),
      );
      await audit(trx, ctx, {
        action: 'fill-weather-gaps',
        entityType: 'weather-station',
        entityId: stationId,
        after: {
          from: input.from,
          to: input.to,
          settings,
          offset,
          days: Object.fromEntries(days.map((d) => [d.date, { temp: d.temp, filled: d.method, note: d.note }])),
        },
      });
    }
    return {
      stationId,
      from: input.from,
      to: input.to,
      settings,
      gaps: plan.gaps.length,
      filled: {
        interpolation: days.filter((d) => d.method === 'interpolation').length,
        secondStation: days.filter((d) => d.method === 'second-station').length,
      },
      alreadyFilled,
      leftEmpty,
      offset,
      offsetRefused: plan.offsetRefused,
      days,
    };
  });
}

/** A second station in the other unit is converted once (NIST SP 811 relations, exact). */
function convert(value: number, from: TemperatureUnit, to: TemperatureUnit): number {
  if (from === to) return value;
  return to === 'C' ? fahrenheitToCelsius(value) : celsiusToFahrenheit(value);
}

/** Filled days of a station on [from, to), by date: what coverage and reports count. */
export async function loadFilledDays(
  db: Executor,
  stationId: string,
  from: string,
  to: string,
): Promise<Map<string, FilledDay['method']>> {
  const rows = await db
    .selectFrom('weather_observations')
    .select(['date', 'fill_method'])
    .where('station_id', '=', stationId)
    .where('date', '>=', from)
    .where('date', '<', to)
    .where('fill_method', 'is not', null)
    .execute();
  return new Map(rows.map((r) => [r.date, r.fill_method!]));
}
