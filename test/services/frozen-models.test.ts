/**
 * Frozen baselines' compact stored models (src/services/frozen-models.ts),
 * on SQLite and PostgreSQL: each is exactly the model its baseline's
 * content gives (same values, same key order, non-finite numbers kept);
 * one that does not check out (edited, another content hash, another
 * format) is never used; missing ones are derived again; the audit
 * verification names a stored model that differs from its content's.
 * Synthetic: a small seeded generated portfolio, so the test sets the truth.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { checkFrozenBaselines } from '../../src/services/frozen-baselines-check.js';
import {
  deriveFrozenModel,
  forgetFrozenModels,
  projectionPart,
  STORED_MODEL_FORMAT,
  storedModelHash,
  storedModelRow,
  storeMissingFrozenModels,
  usableStoredModel,
} from '../../src/services/frozen-models.js';
import type { Store } from '../../src/store/connect.js';
import type { BaselineRow, FrozenModelRow } from '../../src/store/schema.js';
import { openGeneratedPortfolio, type GeneratedPortfolioStore } from '../support/generated-portfolio.js';

let portfolio: GeneratedPortfolioStore;
let store: Store;
let organisationId: string;

beforeAll(async () => {
  portfolio = await openGeneratedPortfolio({
    facilities: 3,
    metersPerFacility: 2,
    stations: 2,
    archetypesPerStation: 2,
    seed: 7,
  });
  ({ store, organisationId } = portfolio);
}, 120_000);

afterAll(async () => portfolio.close());

const baselines = async () =>
  (await store.db
    .selectFrom('baselines')
    .selectAll()
    .where('status', '=', 'frozen')
    .orderBy('id')
    .execute()) as BaselineRow[];
const storedModels = async () => store.db.selectFrom('frozen_models').selectAll().orderBy('baseline_id').execute();

describe('a stored model', () => {
  it('is the model its baseline’s content gives, in the same key order, for every frozen baseline', async () => {
    const rows = await baselines();
    const stored = new Map((await storedModels()).map((m) => [m.baseline_id, m]));
    expect(rows.length).toBe(6);
    for (const row of rows) {
      const entry = stored.get(row.id)!;
      expect(entry.content_hash).toBe(row.content_hash);
      expect(entry.format).toBe(STORED_MODEL_FORMAT);
      const derived = projectionPart(deriveFrozenModel(row, row.content_hash!));
      // The same text as the derived model written in its own key order: a report from either is the same bytes.
      expect(entry.model_json).toBe(JSON.stringify(derived));
      expect(entry.model_hash).toBe(storedModelHash(row.content_hash!, STORED_MODEL_FORMAT, entry.model_json));
      forgetFrozenModels();
      expect(usableStoredModel(row.id, row.content_hash!, entry)).toEqual(derived);
    }
  });

  it('keeps NaN and ±Infinity (JSON alone would make them null)', () => {
    const row = (): FrozenModelRow => ({
      baseline_id: 'bsl_x',
      content_hash: 'h',
      format: STORED_MODEL_FORMAT,
      model_json: '',
      model_hash: '',
    });
    const model = {
      ...projectionPart({
        fit: { stats: { tValue: Number.POSITIVE_INFINITY }, inflationAutocorrelation: Number.NaN },
        residualPeriods: [],
      } as never),
    };
    const stored = { ...row(), ...storedModelRow('bsl_x', 'h', model) };
    forgetFrozenModels();
    const back = usableStoredModel('bsl_x', 'h', stored)!;
    expect((back.fit as unknown as { stats: { tValue: number } }).stats.tValue).toBe(Number.POSITIVE_INFINITY);
    expect(Number.isNaN((back.fit as unknown as { inflationAutocorrelation: number }).inflationAutocorrelation)).toBe(
      true,
    );
  });

  it('is not used when its text was edited, when it came from other content, or when its format is another', async () => {
    const [row] = await baselines();
    const entry = (await storedModels()).find((m) => m.baseline_id === row!.id)!;
    forgetFrozenModels();
    expect(usableStoredModel(row!.id, row!.content_hash!, entry)).not.toBeNull();
    const edited = { ...entry, model_json: entry.model_json.replace('"minCoverage":0.9', '"minCoverage":0.5') };
    expect(edited.model_json).not.toBe(entry.model_json);
    forgetFrozenModels();
    expect(usableStoredModel(row!.id, row!.content_hash!, edited)).toBeNull();
    expect(usableStoredModel(row!.id, 'another-content-hash', entry)).toBeNull();
    expect(usableStoredModel(row!.id, row!.content_hash!, { ...entry, format: STORED_MODEL_FORMAT + 1 })).toBeNull();
  });
});

describe('deriving missing stored models', () => {
  it('stores one for each frozen baseline that has none, and nothing the second time', async () => {
    const before = await storedModels();
    await store.db.deleteFrom('frozen_models').execute();
    expect(await storeMissingFrozenModels(store.db, 4)).toBe(6); // batches of four: a cursor, not a rescan
    expect(await storedModels()).toEqual(before);
    expect(await storeMissingFrozenModels(store.db)).toBe(0);
  });

  it('lets two instances starting together derive them side by side', async () => {
    const before = await storedModels();
    await store.db.deleteFrom('frozen_models').execute();
    const counts = await Promise.all([storeMissingFrozenModels(store.db, 2), storeMissingFrozenModels(store.db, 2)]);
    expect(counts.every((n) => n >= 0 && n <= 6)).toBe(true);
    expect(await storedModels()).toEqual(before);
  });

  it('replaces one of another format, and leaves a baseline whose content no longer matches its hash without one', async () => {
    const [first, second] = await baselines();
    await store.db.updateTable('frozen_models').set({ format: 0 }).where('baseline_id', '=', first!.id).execute();
    await store.db.deleteFrom('frozen_models').where('baseline_id', '=', second!.id).execute();
    await store.db
      .updateTable('baselines')
      .set({ choice_reason: 'edited behind the API' })
      .where('id', '=', second!.id)
      .execute();
    try {
      expect(await storeMissingFrozenModels(store.db)).toBe(1);
      const stored = await storedModels();
      expect(stored.find((m) => m.baseline_id === first!.id)!.format).toBe(STORED_MODEL_FORMAT);
      expect(stored.some((m) => m.baseline_id === second!.id)).toBe(false);
    } finally {
      await store.db
        .updateTable('baselines')
        .set({ choice_reason: second!.choice_reason })
        .where('id', '=', second!.id)
        .execute();
      expect(await storeMissingFrozenModels(store.db)).toBe(1);
    }
  });
});

describe('the audit verification', () => {
  const modelDifferences = async () =>
    (await checkFrozenBaselines(store.db, organisationId)).differences.filter((d) => d.table === 'frozen_models');

  it('finds nothing to say of stored models that are their content’s', async () => {
    expect(await modelDifferences()).toEqual([]);
  });

  it('names a stored model edited under its hash, and one edited with its hash recomputed', async () => {
    const [row] = await baselines();
    const entry = (await storedModels()).find((m) => m.baseline_id === row!.id)!;
    const text = entry.model_json.replace('"minCoverage":0.9', '"minCoverage":0.5');
    try {
      await store.db
        .updateTable('frozen_models')
        .set({ model_json: text })
        .where('baseline_id', '=', row!.id)
        .execute();
      expect(await modelDifferences()).toEqual([
        {
          table: 'frozen_models',
          key: `baseline ${row!.id}`,
          difference: expect.stringContaining('no longer matches its own hash'),
        },
      ]);
      await store.db
        .updateTable('frozen_models')
        .set({ model_hash: storedModelHash(entry.content_hash, entry.format, text) })
        .where('baseline_id', '=', row!.id)
        .execute();
      expect(await modelDifferences()).toEqual([
        {
          table: 'frozen_models',
          key: `baseline ${row!.id}`,
          difference: expect.stringContaining('hash was recomputed to match: reports project with it'),
        },
      ]);
    } finally {
      await store.db
        .updateTable('frozen_models')
        .set({ model_json: entry.model_json, model_hash: entry.model_hash })
        .where('baseline_id', '=', row!.id)
        .execute();
    }
    expect(await modelDifferences()).toEqual([]);
  });
});
