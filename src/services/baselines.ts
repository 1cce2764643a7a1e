/**
 * Baselines: the engine fits a meter's baseline window and the result is
 * kept as a draft; an engineer may choose another fitted shape; freezing
 * seals it under a content hash, so savings always project with exactly the
 * model that was agreed. A frozen baseline is never changed again: a new
 * version supersedes it and the history keeps both.
 */
import {
  TooFewPeriodsError,
  adjustmentsForPeriod,
  alignPeriods,
  analyseBaseline,
  isUsableSignificanceLevel,
  baselineSufficiency,
  checkReadings,
  type BaselineAnalysis,
  type BaselineSufficiency,
  type DailyTemperature,
  type FitDocument,
  type ModelName,
  type Period,
  type ProjectionOverrides,
  type Reading,
  type ShapeFit,
  type TemperatureForm,
  type TemperatureUnit,
} from '../engine/index.js';
import { baselineContentHash, forResponse, fromStoredJson, toStoredJson, verifyBaselineContent } from '../store/baseline-content.js';
import { newId } from '../store/ids.js';
import type { BaselineRow, BaselineStatus } from '../store/schema.js';
import { notFound, DomainError } from '../domain/errors.js';
import { renderSignatureSvg } from '../reports/svg/signature.js';
import { signatureChartPoints } from '../reports/svg/signature-points.js';
import { audit, inTransaction, type Executor, type ServiceContext } from './context.js';
import { getMeterRow } from './meters.js';
import { toEngineAdjustment } from './adjustments.js';
import { loadDailyWeather, loadReadings, loadWeatherFor, stationUnit } from './meter-data.js';
import { bumpMeterVersions } from '../store/data-versions.js';
import { decodeCursor, PAGE_SIZES, pageOf, type PageInfo, type PageRequest } from './paging.js';

export interface BaselineFitOptions {
  minCoverage?: number;
  significanceLevel?: number;
  minPointsPerSegment?: number;
  allowSameSignFourPoint?: boolean;
  /** How each reading's weather enters the fit; default: day-resolved wherever daily weather covers the readings. */
  temperature?: TemperatureForm;
}

/** What was allowed when the baseline was frozen, each with the reason given; null where nothing was. */
export type BaselineOverrides = ProjectionOverrides;

export interface FreezeInput {
  note: string;
  supersedeReason?: string;
  overrides?: { shortBaseline?: { reason: string }; extrapolation?: { reason: string } };
}

/** Exactly what the fit saw: kept with the baseline so it can be re-run and checked. */
export interface BaselineInputs {
  readings: Reading[];
  weather: DailyTemperature[];
  temperatureUnit: TemperatureUnit;
}

export interface BaselineSummary {
  id: string;
  meterId: string;
  version: number;
  status: BaselineStatus;
  start: string;
  end: string;
  options: BaselineFitOptions;
  /** The form the baseline was fitted in, which its projections keep: 'daily' (day-resolved) or 'mean'. */
  temperatureForm: TemperatureForm;
  /** Whether it covers a full cycle of seasons (null for a row without its inputs). */
  sufficiency: BaselineSufficiency | null;
  overrides: BaselineOverrides;
  selected: ModelName;
  chosen: ModelName;
  choiceReason: string | null;
  warnings: string[];
  contentHash: string | null;
  note: string | null;
  frozenAt: string | null;
  frozenBy: string | null;
  supersedes: string | null;
  supersedeReason: string | null;
  createdAt: string;
  createdBy: string;
}

export interface Baseline extends BaselineSummary {
  /** The engine's fit document, non-finite numbers as null. */
  fit: FitDocument;
}

// ---------------------------------------------------------------------------
// Views.

function choiceWarnings(row: BaselineRow, document: FitDocument, sufficiency: BaselineSufficiency | null): string[] {
  const warnings: string[] = [];
  if (sufficiency && !sufficiency.sufficient) {
    const how =
      row.status === 'draft'
        ? 'it is too short to freeze without overrides.shortBaseline.reason'
        : row.short_baseline_override !== null
          ? 'it was frozen with a short-baseline override'
          : 'it was frozen before the rule was enforced';
    warnings.push(`the baseline does not cover a full cycle of seasons (${sufficiency.reasons.join('; ')}): ${how}`);
  }
  if (row.chosen_model !== row.selected_model) {
    warnings.push(`the chosen shape ${row.chosen_model} is an engineer's choice; the engine selected ${row.selected_model}`);
  }
  const chosen = document.candidates.find((c) => c.model === row.chosen_model);
  if (chosen?.verdict === 'rejected') {
    warnings.push(`the chosen shape ${row.chosen_model} was rejected by screening: ${chosen.reasons.join('; ')}`);
  }
  return warnings;
}

/** The baseline's own usable periods, re-aligned from its stored inputs (null for a row without inputs). */
export function storedBaselinePeriods(row: Pick<BaselineRow, 'inputs_json' | 'options_json' | 'document_json'>): Period[] | null {
  const inputs = fromStoredJson<Partial<BaselineInputs>>(row.inputs_json);
  if (!Array.isArray(inputs.readings) || !Array.isArray(inputs.weather)) return null;
  const options = fromStoredJson<BaselineFitOptions>(row.options_json);
  const document = fromStoredJson<Partial<FitDocument>>(row.document_json);
  return alignPeriods(inputs.readings, inputs.weather, { minCoverage: options.minCoverage ?? document.settings?.minCoverage }).periods;
}

export function overridesOf(row: Pick<BaselineRow, 'short_baseline_override' | 'extrapolation_override'>): BaselineOverrides {
  return {
    shortBaseline: row.short_baseline_override === null ? null : { reason: row.short_baseline_override },
    extrapolation: row.extrapolation_override === null ? null : { reason: row.extrapolation_override },
  };
}

function summaryOf(row: BaselineRow, document: FitDocument): BaselineSummary {
  const periods = storedBaselinePeriods(row);
  const sufficiency = periods === null ? null : baselineSufficiency(periods);
  return {
    id: row.id,
    meterId: row.meter_id,
    version: row.version,
    status: row.status,
    start: row.period_start,
    end: row.period_end,
    options: JSON.parse(row.options_json) as BaselineFitOptions,
    temperatureForm: row.temperature_form,
    sufficiency,
    overrides: overridesOf(row),
    selected: row.selected_model as ModelName,
    chosen: row.chosen_model as ModelName,
    choiceReason: row.choice_reason,
    warnings: choiceWarnings(row, document, sufficiency),
    contentHash: row.content_hash,
    note: row.note,
    frozenAt: row.frozen_at,
    frozenBy: row.frozen_by,
    supersedes: row.supersedes_id,
    supersedeReason: row.supersede_reason,
    createdAt: row.created_at,
    createdBy: row.created_by,
  };
}

/**
 * The stored fit document as the API shows it. Documents stored before the
 * day-resolved form existed do not name their form: they are mean-form fits.
 */
function fitDocumentOf(row: BaselineRow): FitDocument {
  const document = forResponse<FitDocument>(row.document_json);
  const form = document.temperatureForm ?? 'mean';
  return {
    ...document,
    temperatureForm: form,
    settings: { ...document.settings, temperatureForm: document.settings.temperatureForm ?? form },
  };
}

function viewOf(row: BaselineRow): Baseline {
  const document = fitDocumentOf(row);
  return { ...summaryOf(row, document), fit: document };
}

export function toBaselineSummary(row: BaselineRow): BaselineSummary {
  return summaryOf(row, fitDocumentOf(row));
}

// ---------------------------------------------------------------------------
// Reads.

/** The organisation's baseline, or a 404 (another organisation's id included). */
export async function getBaselineRow(db: Executor, organisationId: string, id: string): Promise<BaselineRow> {
  const row = await db
    .selectFrom('baselines')
    .selectAll()
    .where('id', '=', id)
    .where('organisation_id', '=', organisationId)
    .executeTakeFirst();
  if (!row) throw notFound('baseline', id);
  return row;
}

export async function getBaseline(db: Executor, organisationId: string, id: string): Promise<Baseline & { verified: boolean }> {
  const row = await getBaselineRow(db, organisationId, id);
  return { ...viewOf(row), verified: verifyBaselineContent(row) };
}

/** The meter's baseline versions, newest first, a page at a time. */
export async function listBaselines(
  db: Executor,
  organisationId: string,
  meterId: string,
  request: PageRequest = { limit: PAGE_SIZES.records.default },
): Promise<{ baselines: BaselineSummary[] } & PageInfo> {
  const before = decodeCursor('baselines', request.cursor, 'n');
  const meter = await getMeterRow(db, organisationId, meterId);
  let q = db.selectFrom('baselines').selectAll().where('meter_id', '=', meter.id);
  if (before) q = q.where('version', '<', before[0] as number);
  const fetched = await q
    .orderBy('version', 'desc')
    .limit(request.limit + 1)
    .execute();
  const { rows, page } = pageOf(fetched, request, 'baselines', (row) => [row.version]);
  return { baselines: rows.map(toBaselineSummary), ...page };
}

// ---------------------------------------------------------------------------
// Writes.

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
    const errors = problems.map((p) => ({ field: describeReading(readings[p.index]!), message: `${p.field}: ${p.message}` }));
    throw new DomainError(
      'unprocessable',
      `${errors[0]!.field}: ${errors[0]!.message}; the stored readings in ${span} must be fixed before a fit`,
      errors,
    );
  }
  const { temperature, ...rest } = options;
  // The schema admits any level in (0, 1); one so small that 1 − α rounds to 1 cannot be tested at.
  if (rest.significanceLevel !== undefined && !isUsableSignificanceLevel(rest.significanceLevel)) {
    const message = `${rest.significanceLevel} is too small to test at: 1 − α rounds to 1 in double precision (the smallest usable level is about 1.1e-16)`;
    throw new DomainError('unprocessable', `options.significanceLevel: ${message}`, [{ field: 'options.significanceLevel', message }]);
  }
  try {
    return analyseBaseline(readings, weather, { ...rest, temperatureForm: temperature });
  } catch (error) {
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

/** Fit the meter's readings inside [start, end) against its station's weather and keep the result as a draft. */
export async function createBaseline(
  ctx: ServiceContext,
  meterId: string,
  input: { start: string; end: string; options?: BaselineFitOptions },
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
  const analysis = analyseWindow(meterId, input, readings, weather, options);

  const fits: Partial<Record<ModelName, ShapeFit>> = {};
  for (const candidate of analysis.choice.candidates) if (candidate.fit) fits[candidate.model] = candidate.fit;
  const inputs: BaselineInputs = { readings, weather, temperatureUnit };

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
    return baseline;
  });
}

function assertDraft(row: BaselineRow): void {
  if (row.status === 'draft') return;
  throw new DomainError(
    'frozen',
    `baseline ${row.id} is ${row.status} (content hash ${row.content_hash}); it cannot be changed: fit a new baseline version and freeze it with a supersedeReason`,
    undefined,
    { baselineId: row.id, baselineStatus: row.status },
  );
}

/** The engineer's choice of shape on a draft: any fitted shape, its verdict recorded beside it. */
export async function chooseModel(ctx: ServiceContext, baselineId: string, input: { model: ModelName; reason: string }): Promise<Baseline> {
  return inTransaction(ctx, async (trx) => {
    const row = await getBaselineRow(trx, ctx.principal.organisationId, baselineId);
    assertDraft(row);
    const document = fromStoredJson<FitDocument>(row.document_json);
    const candidate = document.candidates.find((c) => c.model === input.model);
    const fits = fromStoredJson<Partial<Record<ModelName, ShapeFit>>>(row.fits_json);
    if (!candidate || candidate.verdict === 'not-fitted' || !fits[input.model]) {
      const fitted = document.candidates.filter((c) => c.verdict !== 'not-fitted').map((c) => c.model);
      const why = candidate ? ` (${candidate.reasons.join('; ')})` : '';
      throw new DomainError(
        'unprocessable',
        `model: the ${input.model} shape was not fitted to baseline ${row.id}${why}; fitted shapes: ${fitted.join(', ')}`,
        [{ field: 'model', message: `${input.model} was not fitted` }],
      );
    }
    const updated: BaselineRow = { ...row, chosen_model: input.model, choice_reason: input.reason };
    await trx
      .updateTable('baselines')
      .set({ chosen_model: updated.chosen_model, choice_reason: updated.choice_reason })
      .where('id', '=', row.id)
      .where('status', '=', 'draft')
      .execute();
    await audit(trx, ctx, {
      action: 'choose',
      entityType: 'baseline',
      entityId: row.id,
      before: toBaselineSummary(row),
      after: toBaselineSummary(updated),
    });
    return viewOf(updated);
  });
}

/**
 * A draft shorter than a full cycle of seasons is refused (422, the reasons
 * in words) unless the freeze carries overrides.shortBaseline with a reason;
 * an override with nothing to override is refused too (400), so a recorded
 * override always meant something.
 */
function checkSufficiency(row: BaselineRow, input: FreezeInput): void {
  const periods = storedBaselinePeriods(row);
  if (periods === null) return;
  const sufficiency = baselineSufficiency(periods);
  const override = input.overrides?.shortBaseline;
  if (!sufficiency.sufficient && override === undefined) {
    throw new DomainError(
      'unprocessable',
      `baseline ${row.id} is too short to freeze: ${sufficiency.reasons.join('; ')}. Fit a window that covers a full cycle of seasons, or freeze with overrides.shortBaseline.reason saying why this baseline may be projected from (the reason is kept with the baseline and shown on every document that uses it)`,
      [
        {
          field: 'overrides.shortBaseline.reason',
          message: `required to freeze a baseline shorter than a full cycle of seasons (${sufficiency.periods} periods, ${sufficiency.days} days)`,
        },
      ],
      { sufficiency },
    );
  }
  if (sufficiency.sufficient && override !== undefined) {
    throw new DomainError(
      'invalid',
      `overrides.shortBaseline: baseline ${row.id} covers a full cycle of seasons (${sufficiency.periods} periods, ${sufficiency.days} days); there is nothing to override: leave it out`,
      [{ field: 'overrides.shortBaseline', message: 'nothing to override' }],
    );
  }
}

/**
 * Freeze a draft. When the meter already has a frozen baseline, a reason is
 * required and that baseline becomes superseded in the same transaction; its
 * content and hash are kept as they were. Overrides given here (a short
 * baseline, projection beyond the extrapolation limit) are kept with the
 * baseline under its content hash.
 */
export async function freezeBaseline(ctx: ServiceContext, baselineId: string, input: FreezeInput): Promise<Baseline> {
  return inTransaction(ctx, async (trx) => {
    const row = await getBaselineRow(trx, ctx.principal.organisationId, baselineId);
    assertDraft(row);
    const current = await trx
      .selectFrom('baselines')
      .selectAll()
      .where('meter_id', '=', row.meter_id)
      .where('status', '=', 'frozen')
      .executeTakeFirst();
    if (current && input.supersedeReason === undefined) {
      throw new DomainError(
        'conflict',
        `supersedeReason: meter ${row.meter_id} already has frozen baseline ${current.id} (version ${current.version}, frozen ${current.frozen_at}); send supersedeReason to supersede it`,
        [{ field: 'supersedeReason', message: `required to supersede baseline ${current.id}` }],
        { currentBaselineId: current.id },
      );
    }
    if (!current && input.supersedeReason !== undefined) {
      throw new DomainError('invalid', `supersedeReason: meter ${row.meter_id} has no frozen baseline to supersede; leave it out`, [
        { field: 'supersedeReason', message: 'nothing to supersede' },
      ]);
    }
    checkSufficiency(row, input);
    const frozen: BaselineRow = {
      ...row,
      status: 'frozen',
      note: input.note,
      frozen_at: ctx.now,
      frozen_by: ctx.principal.keyId,
      supersedes_id: current?.id ?? null,
      supersede_reason: input.supersedeReason ?? null,
      short_baseline_override: input.overrides?.shortBaseline?.reason ?? null,
      extrapolation_override: input.overrides?.extrapolation?.reason ?? null,
    };
    frozen.content_hash = baselineContentHash(frozen);
    // Freezing (and superseding) changes which model the meter's savings project with.
    await bumpMeterVersions(trx, [row.meter_id]);

    if (current) {
      const superseded: BaselineRow = { ...current, status: 'superseded' };
      await trx
        .updateTable('baselines')
        .set({ status: 'superseded' })
        .where('id', '=', current.id)
        .where('status', '=', 'frozen')
        .execute();
      await audit(trx, ctx, {
        action: 'supersede',
        entityType: 'baseline',
        entityId: current.id,
        before: toBaselineSummary(current),
        after: { ...toBaselineSummary(superseded), supersededBy: frozen.id, supersedeReason: input.supersedeReason },
      });
    }
    await trx
      .updateTable('baselines')
      .set({
        status: frozen.status,
        note: frozen.note,
        frozen_at: frozen.frozen_at,
        frozen_by: frozen.frozen_by,
        supersedes_id: frozen.supersedes_id,
        supersede_reason: frozen.supersede_reason,
        short_baseline_override: frozen.short_baseline_override,
        extrapolation_override: frozen.extrapolation_override,
        content_hash: frozen.content_hash,
      })
      .where('id', '=', row.id)
      .where('status', '=', 'draft')
      .execute();
    await audit(trx, ctx, {
      action: 'freeze',
      entityType: 'baseline',
      entityId: row.id,
      before: toBaselineSummary(row),
      after: toBaselineSummary(frozen),
    });
    return viewOf(frozen);
  });
}

// ---------------------------------------------------------------------------
// The energy-signature chart.

/** The baseline's energy signature as SVG; reporting periods are added once it has been frozen. */
export async function baselineSignatureSvg(db: Executor, organisationId: string, baselineId: string): Promise<string> {
  const row = await getBaselineRow(db, organisationId, baselineId);
  const meter = await getMeterRow(db, organisationId, row.meter_id);
  const inputs = fromStoredJson<BaselineInputs>(row.inputs_json);
  const options = fromStoredJson<BaselineFitOptions>(row.options_json);
  const fit = fromStoredJson<Partial<Record<ModelName, ShapeFit>>>(row.fits_json)[row.chosen_model as ModelName];
  if (!fit) throw new DomainError('unprocessable', `baseline ${row.id} holds no fit of its chosen shape ${row.chosen_model}`);
  const alignment = { minCoverage: options.minCoverage };
  const baseline = alignPeriods(inputs.readings, inputs.weather, alignment).periods;

  let reporting: Period[] = [];
  if (row.status !== 'draft') {
    const readings = await loadReadings(db, meter.id, { startOnOrAfter: row.period_end });
    const weather = await loadWeatherFor(db, meter.weather_station_id, readings);
    reporting = alignPeriods(readings, weather, alignment).periods;
  }
  // Reporting periods are drawn net of their non-routine adjustments, as savings count them.
  const adjustments =
    reporting.length === 0
      ? []
      : (await db.selectFrom('adjustments').selectAll().where('meter_id', '=', meter.id).where('withdrawn_at', 'is', null).execute()).map(
          toEngineAdjustment,
        );
  const charted = reporting.map((p) => ({
    ...p,
    adjustment: adjustments.length > 0 ? adjustmentsForPeriod(adjustments, p.start, p.end) : 0,
  }));
  const unit = inputs.temperatureUnit;
  return renderSignatureSvg({
    meterName: meter.name,
    model: row.chosen_model,
    version: row.version,
    status: row.status,
    baselineStart: row.period_start,
    baselineEnd: row.period_end,
    temperatureUnit: unit,
    useUnit: meter.unit,
    ...signatureChartPoints(fit, baseline, charted, unit, meter.unit),
  });
}
