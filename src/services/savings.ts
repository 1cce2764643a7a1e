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
  InvalidAdjustmentError,
  alignPeriods,
  projectionRefusals,
  reportingExtrapolation,
  savingsFromAligned,
  withProjectionChecks,
  describeDateRanges,
  missingWeatherDates,
  type CheckedSavingsDocument,
  type SavingsDocument,
  filledDaysByPeriod,
  type PeriodFills,
} from '../engine/index.js';
import { DomainError, notFound } from '../domain/errors.js';
import type { MeterRow } from '../store/schema.js';
import { nonFiniteToNull } from '../lib/non-finite.js';
import type { Executor } from './context.js';
import { loadReadings, loadWeatherWithFillsFor } from './meter-data.js';
import { reportingSeries } from './variables.js';
import { frozenModel, type ProjectionModel } from './frozen-models.js';
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

/** Reporting periods without their variables' values: a 422 naming each period's dates and the variables to post. */
export function missingVariablesProblem(
  error: MissingVariableValuesError,
  variables: ProjectionModel['variables'],
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

/** The meter of the organisation with its frozen baseline, in one query (undefined: no such meter). */
async function meterWithFrozenBaseline(
  db: Executor,
  organisationId: string,
  meterId: string,
): Promise<
  | {
      meter: MeterRow;
      baseline: { id: string; version: number; content_hash: string | null; period_end: string } | null;
    }
  | undefined
> {
  const row = await db
    .selectFrom('meters')
    .leftJoin('baselines', (join) =>
      join.onRef('baselines.meter_id', '=', 'meters.id').on('baselines.status', '=', 'frozen'),
    )
    .selectAll('meters')
    .select([
      'baselines.id as baseline_id',
      'baselines.version as baseline_version',
      'baselines.content_hash as baseline_content_hash',
      'baselines.period_end as baseline_period_end',
    ])
    .where('meters.id', '=', meterId)
    .where('meters.organisation_id', '=', organisationId)
    .executeTakeFirst();
  if (!row) return undefined;
  const { baseline_id, baseline_version, baseline_content_hash, baseline_period_end, ...meter } = row;
  return {
    meter,
    baseline:
      baseline_id === null
        ? null
        : {
            id: baseline_id,
            version: baseline_version!,
            content_hash: baseline_content_hash,
            period_end: baseline_period_end!,
          },
  };
}

export async function meterSavings(
  db: Executor,
  organisationId: string,
  meterId: string,
  query: SavingsQuery,
): Promise<MeterSavings> {
  const read = await meterWithFrozenBaseline(db, organisationId, meterId);
  if (!read) throw notFound('meter', meterId);
  const { meter, baseline } = read;
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
  const { weather, filled } = await loadWeatherWithFillsFor(db, meter.weather_station_id, readings);
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
    // The filled days of [first start, last end): the days the weather was read over.
    weatherFills: filledDaysByPeriod(document.periods, filled),
  });
}
