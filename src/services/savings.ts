/**
 * Avoided energy of a meter against its active frozen baseline. The stored
 * fit of the chosen shape is projected onto the reporting period's weather
 * as it was frozen: never refitted. A frozen row never changes, so its
 * parsed (and hash-checked) model is kept in memory keyed by baseline id and
 * content hash. The document computed here is kept per data version by
 * savings-cache.ts, which is what the route serves.
 */
import {
  TooFewPeriodsError,
  MissingVariableValuesError,
  type VariableAggregation,
  InvalidAdjustmentError,
  alignPeriods,
  baselineSufficiency,
  projectionRefusals,
  reportingExtrapolation,
  savingsFromAligned,
  withProjectionChecks,
  describeDateRanges,
  missingWeatherDates,
  type BaselineSufficiency,
  type CheckedSavingsDocument,
  type ExcludedPeriod,
  type FitDocument,
  type Guideline14Limits,
  type ModelName,
  type Period,
  type ProjectionOverrides,
  type SavingsDocument,
  type TemperatureUnit,
  type ShapeFit,
  filledDaysByPeriod,
  type PeriodFills,
  type AppliedExclusion,
} from '../engine/index.js';
import { DomainError } from '../domain/errors.js';
import { BoundedCache } from '../lib/bounded-cache.js';
import type { BaselineRow } from '../store/schema.js';
import { fromStoredJson, verifyParsedBaselineContent } from '../store/baseline-content.js';
import { nonFiniteToNull } from '../lib/non-finite.js';
import { overridesOf, type BaselineFitOptions, type BaselineInputs } from './baselines/index.js';
import type { Executor } from './context.js';
import { getMeterRow } from './meters.js';
import { loadFilledDays } from './weather-gaps.js';
import { loadReadings, loadWeatherFor } from './meter-data.js';
import { reportingSeries } from './variables.js';
import { adjustmentProblem, toAdjustment, toEngineAdjustment, type Adjustment } from './adjustments.js';

export interface SavingsQuery {
  from?: string;
  to?: string;
  confidence?: number;
}

export interface MeterSavings extends CheckedSavingsDocument {
  meterId: string;
  /** The meter's non-routine adjustments that fall in the reporting periods. */
  adjustments: Adjustment[];
  baselineId: string;
  baselineVersion: number;
  baselineContentHash: string;
  /** Reporting periods whose weather includes days filled on record, by method. */
  weatherFills: PeriodFills[];
}

export interface FrozenModel {
  fit: ShapeFit;
  /** The baseline's own periods as fitted (for the energy signature). */
  baselinePeriods: Period[];
  temperatureUnit: TemperatureUnit;
  limits: Guideline14Limits;
  excluded: ExcludedPeriod[];
  /** Baseline readings the engineer left out, each with its reason (frozen in the fit document). */
  exclusions: AppliedExclusion[];
  minCoverage: number;
  /** Whether the baseline covers a full cycle of seasons. */
  sufficiency: BaselineSufficiency;
  /** What was allowed when it was frozen (kept under its content hash). */
  overrides: ProjectionOverrides;
  /** The stored variables the chosen fit carries (ids fixed when it was fitted), in its order; empty for a weather-only fit. */
  variables: { id: string; name: string; unit: string; aggregation: VariableAggregation; source?: 'calendar' }[];
}

/**
 * Parsed frozen models, by baseline id and content hash (a frozen row never
 * changes), up to about MODEL_CACHE_BYTES of memory. Parsing one (its
 * content hash checked, its baseline realigned) costs a few milliseconds, so
 * a report of 10,000 meters is only quick while their models stay here: the
 * budget holds that many models of three years of monthly bills.
 */
export const MODEL_CACHE_BYTES = 256 * 2 ** 20;

/** A model's memory, roughly (measured: about 16 KiB for 24 monthly bills in the daily form, 730 days): fixed part, per period, per day. */
function modelBytes(model: FrozenModel): number {
  let days = 0;
  for (const period of model.baselinePeriods) days += period.dayTemps?.length ?? 0;
  return 4096 + 400 * model.baselinePeriods.length + 8 * days;
}

const modelCache = new BoundedCache<FrozenModel>(MODEL_CACHE_BYTES, modelBytes);

/** Parse (and check against its hash) the frozen baseline's chosen fit, once per baseline. */
export async function frozenModel(db: Executor, baselineId: string, contentHash: string): Promise<FrozenModel> {
  const cached = modelCache.get(`${baselineId}:${contentHash}`);
  if (cached) return cached;
  const row = (await db
    .selectFrom('baselines')
    .selectAll()
    .where('id', '=', baselineId)
    .executeTakeFirstOrThrow()) as BaselineRow;
  return frozenModelOfRow(row, contentHash);
}

/** The cached model of a frozen baseline, if it has been parsed lately (no database read). */
export function cachedFrozenModel(baselineId: string, contentHash: string): FrozenModel | undefined {
  return modelCache.get(`${baselineId}:${contentHash}`);
}

/** The frozen model of a baseline row already read (checked against its hash, parsed, cached). */
export function frozenModelOfRow(row: BaselineRow, contentHash: string): FrozenModel {
  const key = `${row.id}:${contentHash}`;
  const cached = modelCache.get(key);
  if (cached) return cached;
  const baselineId = row.id;
  const tampered = () =>
    new DomainError(
      'unprocessable',
      `baseline ${baselineId}: its stored content no longer matches its content hash ${contentHash}; savings are refused until this is investigated (see the audit trail)`,
    );
  // Every column parsed first (one that no longer parses has been tampered with), then checked against the hash.
  let document: FitDocument;
  let options: BaselineFitOptions;
  let fits: Partial<Record<ModelName, ShapeFit>>;
  let inputs: BaselineInputs;
  try {
    document = fromStoredJson<FitDocument>(row.document_json);
    options = fromStoredJson<BaselineFitOptions>(row.options_json);
    fits = fromStoredJson<Partial<Record<ModelName, ShapeFit>>>(row.fits_json);
    inputs = fromStoredJson<BaselineInputs>(row.inputs_json);
  } catch {
    throw tampered();
  }
  if (!verifyParsedBaselineContent(row)) throw tampered();
  const fit = fits[row.chosen_model as ModelName];
  if (!fit)
    throw new DomainError(
      'unprocessable',
      `baseline ${baselineId} holds no fit of its chosen shape ${row.chosen_model}`,
    );
  const minCoverage = options.minCoverage ?? document.settings.minCoverage;
  const baselinePeriods = alignPeriods(inputs.readings, inputs.weather, {
    minCoverage,
    variableSeries: inputs.variables ?? [],
  }).periods;
  const variables = (fit.variables ?? []).map((name) => {
    const stored = inputs.variables?.find((v) => v.name === name);
    if (!stored)
      throw new DomainError(
        'unprocessable',
        `baseline ${baselineId}: its fit carries the variable "${name}" but its inputs do not`,
      );
    return {
      id: stored.id,
      name: stored.name,
      unit: stored.unit,
      aggregation: stored.aggregation,
      ...(stored.source ? { source: stored.source } : {}),
    };
  });
  const model: FrozenModel = {
    fit,
    baselinePeriods,
    temperatureUnit: inputs.temperatureUnit,
    limits: document.settings.guideline14,
    excluded: document.periods.excluded,
    exclusions: document.exclusions ?? [],
    minCoverage,
    sufficiency: baselineSufficiency(baselinePeriods),
    overrides: overridesOf(row),
    variables,
  };
  return modelCache.set(key, model);
}

/** Reporting periods without their variables' values: a 422 naming each period's dates and the variables to post. */
export function missingVariablesProblem(
  error: MissingVariableValuesError,
  variables: FrozenModel['variables'],
): DomainError {
  const ids = variables.map((v) => `${v.name} (${v.id})`).join(', ');
  return new DomainError(
    'unprocessable',
    `${error.message}; post the values to POST /v1/variables/{id}/values for ${ids}`,
    error.periods
      .slice(0, 100)
      .map((p) => ({ field: `reading ${p.start}..${p.end}`, message: `no value of ${p.missing.join(', ')}` })),
  );
}

function windowText(start: string, to: string | undefined): string {
  return to === undefined ? `starting on or after ${start}` : `lying in ${start}..${to}`;
}

export async function meterSavings(
  db: Executor,
  organisationId: string,
  meterId: string,
  query: SavingsQuery,
): Promise<MeterSavings> {
  const meter = await getMeterRow(db, organisationId, meterId);
  const baseline = await db
    .selectFrom('baselines')
    .select(['id', 'version', 'content_hash', 'period_end'])
    .where('meter_id', '=', meter.id)
    .where('status', '=', 'frozen')
    .executeTakeFirst();
  if (!baseline || baseline.content_hash === null) {
    throw new DomainError(
      'unprocessable',
      `meter ${meterId} has no frozen baseline: freeze a baseline first (POST /v1/baselines/{id}/freeze)`,
    );
  }
  const model = await frozenModel(db, baseline.id, baseline.content_hash);

  const start = query.from !== undefined && query.from > baseline.period_end ? query.from : baseline.period_end;
  const readings = await loadReadings(db, meter.id, { startOnOrAfter: start, endOnOrBefore: query.to });
  if (readings.length === 0) {
    throw new DomainError(
      'unprocessable',
      `meter ${meterId} has no reporting readings ${windowText(start, query.to)}; reporting readings start on or after the baseline's end ${baseline.period_end}`,
    );
  }
  const weather = await loadWeatherFor(db, meter.weather_station_id, readings);
  const last = readings.reduce((end, r) => (r.end > end ? r.end : end), start);
  const adjustmentRows = await db
    .selectFrom('adjustments')
    .selectAll()
    .where('meter_id', '=', meter.id)
    .where('withdrawn_at', 'is', null)
    .where('period_start', '<', last)
    .where('period_end', '>', readings[0]!.start)
    .orderBy('period_start')
    .execute();
  const variableSeries = await reportingSeries(db, model.variables, { from: readings[0]!.start, to: last });
  const options = {
    confidence: query.confidence,
    minCoverage: model.minCoverage,
    adjustments: adjustmentRows.map(toEngineAdjustment),
    variableSeries,
  };
  const aligned = alignPeriods(readings, weather, options);
  let document: SavingsDocument;
  try {
    document = savingsFromAligned(model.fit, { limits: model.limits, excluded: model.excluded }, aligned, options);
  } catch (error) {
    if (error instanceof InvalidAdjustmentError) throw adjustmentProblem(error);
    if (error instanceof MissingVariableValuesError) throw missingVariablesProblem(error, model.variables);
    if (!(error instanceof TooFewPeriodsError)) throw error;
    const { excluded } = error;
    const reasons = excluded.map((p) => `reading ${p.start}..${p.end}: ${p.reason}`).join('; ');
    const missing = missingWeatherDates(excluded, weather);
    const cause =
      missing.length > 0
        ? `missing weather for dates ${describeDateRanges(missing)} at weather station ${meter.weather_station_id}: `
        : '';
    throw new DomainError(
      'unprocessable',
      `${cause}${error.message}${reasons ? `: ${reasons}` : ''}`,
      excluded.map((p) => ({ field: `reading ${p.start}..${p.end}`, message: p.reason })),
    );
  }
  const checks = {
    sufficiency: model.sufficiency,
    extrapolation: reportingExtrapolation(model.fit, aligned.periods),
    overrides: model.overrides,
  };
  // A baseline frozen short carries its override (freezing refuses it otherwise); one frozen before that rule is shown, not refused.
  const refusal = projectionRefusals(checks, { requireSufficiency: false })[0];
  if (refusal) {
    const e = checks.extrapolation;
    throw new DomainError(
      'unprocessable',
      `meter ${meterId}: savings ${windowText(start, query.to)} are refused: ${refusal.reason}. Frozen baseline ${baseline.id} (version ${baseline.version}) never saw that weather: fit and freeze a baseline that covers it, or freeze one with overrides.extrapolation.reason saying why it may be projected this far`,
      undefined,
      { extrapolation: { share: e.share, limit: e.limit, outsideDays: e.outsideDays, days: e.days, basis: e.basis } },
    );
  }
  const checked = withProjectionChecks(document, checks);
  return nonFiniteToNull({
    ...checked,
    meterId: meter.id,
    adjustments: adjustmentRows.map(toAdjustment),
    baselineId: baseline.id,
    baselineVersion: baseline.version,
    baselineContentHash: baseline.content_hash,
    weatherFills: filledDaysByPeriod(
      document.periods,
      await loadFilledDays(db, meter.weather_station_id, readings[0]!.start, last),
    ),
  });
}
