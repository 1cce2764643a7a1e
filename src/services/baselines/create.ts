/**
 * Fitting a draft: the meter's readings in the window against its station's
 * weather, or a 422 saying plainly why the window cannot be fitted.
 */
import {
  ExclusionError,
  MissingVariableValuesError,
  TooFewPeriodsError,
  VariableChoiceError,
  analyseBaseline,
  checkReadings,
  isUsableSignificanceLevel,
  type BaselineAnalysis,
  type DailyTemperature,
  type Exclusion,
  type ModelName,
  type Reading,
  type ShapeFit,
  type VariableSeries,
} from '../../engine/index.js';
import { toStoredJson } from '../../store/baseline-content.js';
import { newId } from '../../store/ids.js';
import type { BaselineRow } from '../../store/schema.js';
import { DomainError, summarise } from '../../domain/errors.js';
import { audit, inTransaction, type ServiceContext } from '../context.js';
import { getMeterRow } from '../meters.js';
import { loadDailyWeather, loadReadings, stationUnit } from '../meter-data.js';
import type { Baseline, BaselineFitOptions, BaselineInputs, ExclusionRequest, StoredVariableSeries } from './types.js';
import { calendarSeries } from '../calendars.js';
import type { Executor } from '../../store/executor.js';
import { readingId } from '../readings.js';
import { variableSeriesForMeter } from '../variables.js';
import { viewOf } from './views.js';
import { baselineWeatherFills } from './fills.js';

function describeReading(reading: { start: string; end: string }): string {
  return `reading ${reading.start}..${reading.end}`;
}

/** Run the engine on the window, or say plainly why it cannot be fitted (422). */
function analyseWindow(
  meterId: string,
  window: { start: string; end: string },
  readings: readonly Reading[],
  weather: readonly DailyTemperature[],
  options: BaselineFitOptions,
  exclusions: readonly Exclusion[] = [],
  variableSeries: readonly VariableSeries[] = [],
): BaselineAnalysis {
  const span = `${window.start}..${window.end} (end exclusive)`;
  if (readings.length === 0) {
    throw new DomainError(
      'unprocessable',
      `start: no reading of meter ${meterId} lies fully inside ${span}; post the baseline readings first`,
      [{ field: 'start', message: `no readings inside ${span}` }],
    );
  }
  const problems = checkReadings(readings);
  if (problems.length > 0) {
    const errors = problems.map((p) => ({
      field: describeReading(readings[p.index]!),
      message: `${p.field}: ${p.message}`,
    }));
    throw new DomainError(
      'unprocessable',
      `${summarise(errors)}; the stored readings in ${span} must be fixed before a fit`,
      errors,
    );
  }
  const { temperature, ...rest } = options;
  // The schema admits any level in (0, 1); one so small that 1 − α rounds to 1 cannot be tested at.
  if (rest.significanceLevel !== undefined && !isUsableSignificanceLevel(rest.significanceLevel)) {
    const message = `${rest.significanceLevel} is too small to test at: 1 − α rounds to 1 in double precision (the smallest usable level is about 1.1e-16)`;
    throw new DomainError('unprocessable', `options.significanceLevel: ${message}`, [
      { field: 'options.significanceLevel', message },
    ]);
  }
  try {
    return analyseBaseline(readings, weather, { ...rest, temperatureForm: temperature, exclusions, variableSeries });
  } catch (error) {
    if (error instanceof ExclusionError || error instanceof VariableChoiceError) {
      throw new DomainError('unprocessable', error.message, [{ field: error.field, message: error.message }]);
    }
    if (error instanceof MissingVariableValuesError) {
      const errors = error.periods.map((p) => ({
        field: describeReading(p),
        message: `no value of ${p.missing.join(', ')}`,
      }));
      throw new DomainError('unprocessable', error.message, errors);
    }
    if (!(error instanceof TooFewPeriodsError)) throw error;
    const { excluded } = error;
    const left =
      excluded.length > 0
        ? `; ${excluded.length} of ${readings.length} readings in ${span} were left out: ${excluded.map((p) => `${describeReading(p)}: ${p.reason}`).join('; ')}`
        : '';
    throw new DomainError(
      'unprocessable',
      `${error.message}${left}`,
      excluded.map((p) => ({ field: describeReading(p), message: p.reason })),
    );
  }
}

/**
 * The engineer's exclusions named by reading id or period: each must be one
 * of the meter's readings lying fully inside the window (422 naming the
 * entry otherwise). The engine checks the rest (reasons, twice, a fifth).
 */
async function resolveExclusions(
  db: Executor,
  meterId: string,
  window: { start: string; end: string },
  requests: readonly ExclusionRequest[],
): Promise<Exclusion[]> {
  if (requests.length === 0) return [];
  const rows = await db
    .selectFrom('readings')
    .select(['period_start', 'period_end'])
    .where('meter_id', '=', meterId)
    .where('period_start', '>=', window.start)
    .where('period_end', '<=', window.end)
    .execute();
  return requests.map((request, i) => {
    const field = `exclusions[${i}]`;
    const row =
      request.readingId !== undefined
        ? rows.find((r) => readingId(r.period_start, r.period_end) === request.readingId)
        : rows.find((r) => r.period_start === request.start && r.period_end === request.end);
    if (!row) {
      const what =
        request.readingId !== undefined ? `reading ${request.readingId}` : `a reading ${request.start}..${request.end}`;
      const message = `${what} is not one of this meter's readings inside ${window.start}..${window.end} (end exclusive)`;
      throw new DomainError('unprocessable', `${field}: ${message}`, [{ field, message }]);
    }
    if (
      request.readingId !== undefined &&
      request.start !== undefined &&
      (request.start !== row.period_start || request.end !== row.period_end)
    ) {
      const message = `reading ${request.readingId} covers ${row.period_start}..${row.period_end}, not ${request.start}..${request.end}`;
      throw new DomainError('unprocessable', `${field}: ${message}`, [{ field, message }]);
    }
    return {
      readingId: readingId(row.period_start, row.period_end),
      start: row.period_start,
      end: row.period_end,
      reason: request.reason,
    };
  });
}

/** Fit the meter's readings inside [start, end) against its station's weather and keep the result as a draft. */
export async function createBaseline(
  ctx: ServiceContext,
  meterId: string,
  input: { start: string; end: string; options?: BaselineFitOptions; exclusions?: readonly ExclusionRequest[] },
): Promise<Baseline> {
  const organisationId = ctx.principal.organisationId;
  const db = ctx.store.db;
  if (!(input.end > input.start)) {
    throw new DomainError('invalid', 'end: must be after start', [{ field: 'end', message: 'must be after start' }]);
  }
  const meter = await getMeterRow(db, organisationId, meterId);
  const options = input.options ?? {};
  const temperatureUnit = await stationUnit(db, organisationId, meter.weather_station_id);
  const readings = await loadReadings(db, meter.id, { startOnOrAfter: input.start, endOnOrBefore: input.end });
  const weather = await loadDailyWeather(db, meter.weather_station_id, input.start, input.end);
  const exclusions = await resolveExclusions(db, meter.id, input, input.exclusions ?? []);
  const offered = [...new Set([...(options.variables ?? []), ...(options.variableOverrides ?? []).map((o) => o.name)])];
  const stored = await variableSeriesForMeter(db, meter, offered, { from: input.start, to: input.end });
  const days = options.dayTypes
    ? (await calendarSeries(db, meter.facility_id, { from: input.start, to: input.end }, 'options.dayTypes')).map(
        (s) => ({
          ...s,
          id: meter.facility_id,
          unit: 'share of days',
          source: 'calendar' as const,
        }),
      )
    : [];
  const series: StoredVariableSeries[] = [...stored.series, ...days];
  const { dayTypes: _dayTypes, ...fitOptions } = options;
  const withDays =
    days.length > 0
      ? { ...fitOptions, variables: [...(options.variables ?? []), ...days.map((d) => d.name)] }
      : fitOptions;
  const analysis = analyseWindow(meterId, input, readings, weather, withDays, exclusions, series);

  const fits: Partial<Record<ModelName, ShapeFit>> = {};
  for (const candidate of analysis.choice.candidates) if (candidate.fit) fits[candidate.model] = candidate.fit;
  // What the fit saw: the readings the engineer left out stay out of the stored inputs (they are recorded in the document's exclusions).
  const kept = readings.filter((r) => !exclusions.some((e) => e.start === r.start && e.end === r.end));
  const inputs: BaselineInputs = {
    readings: kept,
    weather,
    temperatureUnit,
    ...(series.length > 0 ? { variables: series } : {}),
  };

  return inTransaction(ctx, async (trx) => {
    const last = await trx
      .selectFrom('baselines')
      .select((eb) => eb.fn.max<number>('version').as('version'))
      .where('meter_id', '=', meter.id)
      .executeTakeFirst();
    const row: BaselineRow = {
      id: newId('bsl'),
      organisation_id: organisationId,
      meter_id: meter.id,
      version: (last?.version ?? 0) + 1,
      period_start: input.start,
      period_end: input.end,
      status: 'draft',
      options_json: toStoredJson(options),
      document_json: toStoredJson(analysis.document),
      fits_json: toStoredJson(fits),
      inputs_json: toStoredJson(inputs),
      selected_model: analysis.choice.selected,
      chosen_model: analysis.choice.selected,
      choice_reason: null,
      content_hash: null,
      note: null,
      frozen_at: null,
      frozen_by: null,
      supersedes_id: null,
      supersede_reason: null,
      created_at: ctx.now,
      created_by: ctx.principal.keyId,
      temperature_form: analysis.document.temperatureForm,
      short_baseline_override: null,
      extrapolation_override: null,
    };
    await trx.insertInto('baselines').values(row).execute();
    const baseline = viewOf(row);
    const { fit: _fit, ...summary } = baseline;
    await audit(trx, ctx, { action: 'create', entityType: 'baseline', entityId: row.id, after: summary });
    return { ...baseline, weatherFills: await baselineWeatherFills(trx, row) };
  });
}
