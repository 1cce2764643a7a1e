/**
 * The quick check of a frozen baseline's content (verifyParsedBaselineContent,
 * which hashes the stored columns' own text) against the full one
 * (verifyBaselineContent): the same verdict on a sealed row, on a row whose
 * columns hold the same content written differently, and on rows changed
 * behind the ledger's back. Synthetic: one baseline of the seeded generated
 * portfolio, changed by the test.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { generatePortfolio } from '../../src/demo/portfolio.js';
import { verifyBaselineContent, verifyParsedBaselineContent } from '../../src/store/baseline-content.js';
import { openStore, type Store } from '../../src/store/connect.js';
import { migrateToLatest } from '../../src/store/migrate.js';
import type { BaselineRow } from '../../src/store/schema.js';

let store: Store;
let row: BaselineRow;

beforeAll(async () => {
  store = openStore('sqlite::memory:');
  await migrateToLatest(store.db);
  await generatePortfolio(store.db, {
    facilities: 1,
    metersPerFacility: 1,
    stations: 1,
    archetypesPerStation: 1,
    seed: 5,
  });
  row = (await store.db.selectFrom('baselines').selectAll().executeTakeFirstOrThrow()) as BaselineRow;
}, 60_000);

afterAll(() => store.close());

const both = (r: BaselineRow) => [verifyParsedBaselineContent(r), verifyBaselineContent(r)];

describe('verifyParsedBaselineContent', () => {
  it('holds for the sealed row, as the full check does', () => {
    expect(both(row)).toEqual([true, true]);
  });

  it('holds when a column holds the same content in other whitespace (the full computation decides)', () => {
    const spaced = { ...row, inputs_json: JSON.stringify(JSON.parse(row.inputs_json), null, 1) };
    expect(spaced.inputs_json).not.toBe(row.inputs_json);
    expect(both(spaced)).toEqual([true, true]);
  });

  it('fails when a stored figure, the chosen shape, an override or the temperature form is changed', () => {
    const inputs = JSON.parse(row.inputs_json) as { weather: { temp: number }[] };
    inputs.weather[3]!.temp += 0.1;
    for (const changed of [
      { ...row, inputs_json: JSON.stringify(inputs) },
      { ...row, document_json: row.document_json.replace('"selected":"', '"selected":"x') },
      { ...row, chosen_model: row.chosen_model === '3PC' ? '3PH' : '3PC' },
      { ...row, extrapolation_override: 'a reason added later' },
      { ...row, temperature_form: row.temperature_form === 'daily' ? ('mean' as const) : ('daily' as const) },
      { ...row, meter_id: 'mtr_other' },
    ])
      expect(both(changed)).toEqual([false, false]);
  });
});
