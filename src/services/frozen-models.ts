/**
 * A frozen baseline's model, as savings and reports project with it.
 *
 * The truth is the baseline's stored content (its fit document, fits,
 * options and inputs: some 50 KB for three years of daily weather), checked
 * against its content hash and realigned before use. That costs about a
 * millisecond a meter, which a report of 10,000 meters cannot pay on every
 * run. So the part a projection needs (the chosen fit, its limits and
 * exclusions, sufficiency, overrides, variables and the dates of its
 * residuals: about 3 KB) is derived once, when the baseline is frozen, and
 * kept beside it in `frozen_models`, bound to the content hash it came from
 * and hashed itself.
 *
 * Derived bookkeeping, not ledger content: not exported (an import derives
 * it again), never trusted over the content. A stored model is used only
 * when its own hash, its content hash and its format agree; otherwise the
 * model is derived from the content as before. The audit verification
 * derives every frozen baseline's model again and names any stored one that
 * differs (src/services/frozen-baselines-check.ts).
 */
import {
  alignPeriods,
  baselineSufficiency,
  type AppliedExclusion,
  type BaselineSufficiency,
  type ExcludedPeriod,
  type FitDocument,
  type Guideline14Limits,
  type ModelName,
  type Period,
  type ProjectionOverrides,
  type ShapeFit,
  type TemperatureUnit,
  type VariableAggregation,
} from '../engine/index.js';
import { DomainError } from '../domain/errors.js';
import { BoundedCache } from '../lib/bounded-cache.js';
import { sha256Hex } from '../lib/canonical-json.js';
import { fromStoredJson, toOrderedStoredJson, verifyParsedBaselineContent } from '../store/baseline-content.js';
import type { Kysely } from 'kysely';
import type { BaselineRow, Database, FrozenModelRow } from '../store/schema.js';
import type { BaselineFitOptions, BaselineInputs } from './baselines/types.js';
import { overridesOf } from './baselines/views.js';
import type { Executor } from './context.js';

/** What a projection needs of a frozen baseline. */
export interface ProjectionModel {
  fit: ShapeFit;
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
  /** The dates of the baseline's periods in start order, the order of the fit's residuals (for a roll-up's correlation). */
  residualPeriods: { start: string; end: string }[];
}

/** The model with the baseline's own periods as fitted, daily temperatures included (what the energy-signature chart draws). */
export interface FrozenModel extends ProjectionModel {
  baselinePeriods: Period[];
}

/** The stored form's layout; a stored model of another format is derived again from the content. */
export const STORED_MODEL_FORMAT = 1;

/**
 * Models by baseline id and content hash (a frozen row never changes).
 * Whole models (with their periods' daily temperatures) are kept up to
 * FULL_MODEL_CACHE_BYTES; projection models, read from their stored form,
 * up to PROJECTION_MODEL_CACHE_BYTES (about 5 KB each: the budget holds the
 * models of some 10,000 meters).
 */
export const FULL_MODEL_CACHE_BYTES = 128 * 2 ** 20;
export const PROJECTION_MODEL_CACHE_BYTES = 64 * 2 ** 20;

/** A whole model's memory, roughly (measured: about 16 KiB for 24 monthly bills in the daily form, 730 days): fixed part, per period, per day. */
function fullModelBytes(model: FrozenModel): number {
  let days = 0;
  for (const period of model.baselinePeriods) days += period.dayTemps?.length ?? 0;
  return 4096 + 400 * model.baselinePeriods.length + 8 * days;
}

/** A projection model's memory, roughly: fixed part and its residuals' periods and fit. */
function projectionModelBytes(model: ProjectionModel): number {
  return 4096 + 200 * model.residualPeriods.length;
}

const fullModels = new BoundedCache<FrozenModel>(FULL_MODEL_CACHE_BYTES, fullModelBytes);
const projectionModels = new BoundedCache<ProjectionModel>(PROJECTION_MODEL_CACHE_BYTES, projectionModelBytes);

const cacheKey = (baselineId: string, contentHash: string) => `${baselineId}:${contentHash}`;

/** Forget every model held in memory (tests that compare what is read from the database with what is derived). */
export function forgetFrozenModels(): void {
  fullModels.clear();
  projectionModels.clear();
}

/** The whole model of a frozen baseline (read, checked against its hash and parsed once per baseline). */
export async function frozenModel(db: Executor, baselineId: string, contentHash: string): Promise<FrozenModel> {
  const cached = fullModels.get(cacheKey(baselineId, contentHash));
  if (cached) return cached;
  const row = (await db
    .selectFrom('baselines')
    .selectAll()
    .where('id', '=', baselineId)
    .executeTakeFirstOrThrow()) as BaselineRow;
  return frozenModelOfRow(row, contentHash);
}

/** A model held in memory for this baseline, if any (no database read). */
function cachedProjectionModel(baselineId: string, contentHash: string): ProjectionModel | undefined {
  const key = cacheKey(baselineId, contentHash);
  return projectionModels.get(key) ?? fullModels.get(key);
}

/** The whole model of a baseline row already read: its content checked against its hash, parsed, realigned and cached. */
function frozenModelOfRow(row: BaselineRow, contentHash: string): FrozenModel {
  const key = cacheKey(row.id, contentHash);
  const cached = fullModels.get(key);
  if (cached) return cached;
  return fullModels.set(key, deriveFrozenModel(row, contentHash));
}

/** The model from the baseline's content, with no cache: what the stored form must equal. */
export function deriveFrozenModel(row: BaselineRow, contentHash: string): FrozenModel {
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
  if (row.content_hash !== contentHash || !verifyParsedBaselineContent(row)) throw tampered();
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
  const residualPeriods = baselinePeriods
    .map((p) => ({ start: p.start, end: p.end }))
    .sort((a, b) => (a.start < b.start ? -1 : a.start > b.start ? 1 : 0));
  return {
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
    residualPeriods,
  };
}

/** The projection part of a whole model (what is stored). */
export function projectionPart(model: ProjectionModel): ProjectionModel {
  return {
    fit: model.fit,
    temperatureUnit: model.temperatureUnit,
    limits: model.limits,
    excluded: model.excluded,
    exclusions: model.exclusions,
    minCoverage: model.minCoverage,
    sufficiency: model.sufficiency,
    overrides: model.overrides,
    variables: model.variables,
    residualPeriods: model.residualPeriods,
  };
}

/** The stored row of a frozen baseline's model: its text (non-finite numbers kept) and the hash binding it to the content hash. */
export function storedModelRow(baselineId: string, contentHash: string, model: ProjectionModel): FrozenModelRow {
  // In the derived model's own key order: a report written from the stored form is the same bytes as one written from the content.
  const modelJson = toOrderedStoredJson(projectionPart(model));
  return {
    baseline_id: baselineId,
    content_hash: contentHash,
    format: STORED_MODEL_FORMAT,
    model_json: modelJson,
    model_hash: storedModelHash(contentHash, STORED_MODEL_FORMAT, modelJson),
  };
}

/** The hash a stored model carries: of the content hash it came from, its format and its text. */
export function storedModelHash(contentHash: string, format: number, modelJson: string): string {
  return sha256Hex(`${contentHash}\n${format}\n${modelJson}`);
}

/**
 * A stored model, when it can be used for this content hash: its format
 * current and its hash intact; null otherwise (the caller derives it from
 * the content instead). Cached once read.
 */
export function usableStoredModel(
  baselineId: string,
  contentHash: string,
  stored: Pick<FrozenModelRow, 'content_hash' | 'format' | 'model_json' | 'model_hash'>,
): ProjectionModel | null {
  if (stored.content_hash !== contentHash || stored.format !== STORED_MODEL_FORMAT) return null;
  if (storedModelHash(contentHash, stored.format, stored.model_json) !== stored.model_hash) return null;
  let model: ProjectionModel;
  try {
    model = fromStoredJson<ProjectionModel>(stored.model_json);
  } catch {
    return null;
  }
  return projectionModels.set(cacheKey(baselineId, contentHash), model);
}

/**
 * The models of frozen baselines, by baseline id, for many at once (a
 * report's chunk): from memory, else from their stored compact form where
 * it checks out (one query), else derived from their whole content, read and
 * checked against its hash (one more query). A baseline without a content
 * hash has none.
 */
export async function projectionModelsOf(
  db: Executor,
  baselines: readonly { id: string; content_hash: string | null }[],
): Promise<Map<string, ProjectionModel>> {
  const models = new Map<string, ProjectionModel>();
  const hashes = new Map<string, string>();
  for (const { id, content_hash } of baselines) {
    if (content_hash === null) continue;
    const held = cachedProjectionModel(id, content_hash);
    if (held) models.set(id, held);
    else hashes.set(id, content_hash);
  }
  if (hashes.size > 0) {
    const stored = await db
      .selectFrom('frozen_models')
      .select(['baseline_id', 'content_hash', 'format', 'model_json', 'model_hash'])
      .where('baseline_id', 'in', [...hashes.keys()])
      .execute();
    for (const entry of stored) {
      const model = usableStoredModel(entry.baseline_id, hashes.get(entry.baseline_id)!, entry);
      if (model) {
        models.set(entry.baseline_id, model);
        hashes.delete(entry.baseline_id);
      }
    }
  }
  if (hashes.size > 0) {
    const rows = await db
      .selectFrom('baselines')
      .selectAll()
      .where('id', 'in', [...hashes.keys()])
      .execute();
    for (const row of rows) models.set(row.id, frozenModelOfRow(row as BaselineRow, hashes.get(row.id)!));
  }
  return models;
}

/** Store the model of a baseline just frozen (in the freeze's transaction); a row already there for it is replaced. */
export async function storeFrozenModel(db: Executor, row: BaselineRow, contentHash: string): Promise<void> {
  // Not cached: the transaction may yet roll back, and the first savings request checks the content again.
  const stored = storedModelRow(row.id, contentHash, deriveFrozenModel(row, contentHash));
  await upsertStoredModel(db, stored);
}

/** Write a stored model, replacing one already there for its baseline (two instances deriving the same one at start both succeed). */
function upsertStoredModel(db: Executor, stored: FrozenModelRow): Promise<unknown> {
  return db
    .insertInto('frozen_models')
    .values(stored)
    .onConflict((conflict) =>
      conflict.column('baseline_id').doUpdateSet({
        content_hash: stored.content_hash,
        format: stored.format,
        model_json: stored.model_json,
        model_hash: stored.model_hash,
      }),
    )
    .execute();
}

/**
 * Derive and store the model of every frozen baseline that has none usable
 * (a database from before stored models, or an organisation imported), a
 * batch at a time, each batch in its own transaction. Answers how many were
 * stored. A baseline whose content no longer matches its hash is left
 * without one (its savings are refused, and the audit verification names it).
 */
export async function storeMissingFrozenModels(db: Kysely<Database>, batch = 200): Promise<number> {
  let stored = 0;
  let after = '';
  for (;;) {
    const ids = await db
      .selectFrom('baselines')
      .leftJoin('frozen_models', 'frozen_models.baseline_id', 'baselines.id')
      .select('baselines.id')
      .where('baselines.status', '=', 'frozen')
      .where('baselines.content_hash', 'is not', null)
      .where('baselines.id', '>', after)
      .where((eb) =>
        eb.or([
          eb('frozen_models.baseline_id', 'is', null),
          eb('frozen_models.format', '!=', STORED_MODEL_FORMAT),
          eb('frozen_models.content_hash', '!=', eb.ref('baselines.content_hash')),
        ]),
      )
      .orderBy('baselines.id')
      .limit(batch)
      .execute();
    if (ids.length === 0) return stored;
    after = ids[ids.length - 1]!.id;
    await db.transaction().execute(async (trx) => {
      const rows = (await trx
        .selectFrom('baselines')
        .selectAll()
        .where(
          'id',
          'in',
          ids.map((r) => r.id),
        )
        .where('status', '=', 'frozen')
        .execute()) as BaselineRow[];
      for (const row of rows) {
        let model: FrozenModel;
        try {
          model = deriveFrozenModel(row, row.content_hash!);
        } catch {
          continue;
        }
        await upsertStoredModel(trx, storedModelRow(row.id, row.content_hash!, model));
        stored++;
      }
    });
  }
}
