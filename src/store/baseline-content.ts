/**
 * How a baseline is kept: its JSON columns and its content hash.
 *
 * Stored JSON. Fits may hold NaN or ±Infinity (a t-statistic of an exact fit,
 * an undefined autocorrelation); plain JSON would turn them into null and a
 * stored model would no longer be the fitted one. They are stored as
 * {"$nonFinite": "NaN"} and restored on reading; keys are sorted so equal
 * content gives equal text.
 */
import { canonicalJson, sha256Hex } from '../lib/canonical-json.js';
import type { BaselineRow } from './schema.js';

const NON_FINITE = '$nonFinite';

function tagNonFinite(value: unknown): unknown {
  if (typeof value === 'number') return Number.isFinite(value) ? value : { [NON_FINITE]: String(value) };
  if (Array.isArray(value)) return value.map(tagNonFinite);
  if (value !== null && typeof value === 'object') {
    const out: Record<string, unknown> = {};
    for (const [key, entry] of Object.entries(value)) out[key] = tagNonFinite(entry);
    return out;
  }
  return value;
}

function isNonFiniteTag(value: unknown): value is Record<typeof NON_FINITE, string> {
  if (value === null || typeof value !== 'object' || Array.isArray(value)) return false;
  const keys = Object.keys(value);
  return (
    keys.length === 1 && keys[0] === NON_FINITE && typeof (value as Record<string, unknown>)[NON_FINITE] === 'string'
  );
}

/** Canonical JSON that keeps NaN and ±Infinity. */
export function toStoredJson(value: unknown): string {
  return canonicalJson(tagNonFinite(value));
}

/**
 * Stored JSON in the value's own key order (not canonical): parsed back it
 * gives an object whose keys come in the same order, so a document written
 * from it is byte for byte the one written from the original.
 */
export function toOrderedStoredJson(value: unknown): string {
  return JSON.stringify(tagNonFinite(value));
}

/** Parse stored JSON back to the exact values, non-finite numbers restored. */
export function fromStoredJson<T>(text: string): T {
  // Most stored documents hold no non-finite number: parsing without a reviver is several times quicker.
  if (!text.includes(NON_FINITE_KEY_TEXT)) return JSON.parse(text) as T;
  return JSON.parse(text, (_key, value: unknown) => (isNonFiniteTag(value) ? Number(value[NON_FINITE]) : value)) as T;
}

/** The tag's key as it appears in stored text (a key is always written this way by canonicalJson). */
const NON_FINITE_KEY_TEXT = JSON.stringify(NON_FINITE);

/** Parse stored JSON for an API response: non-finite numbers become null (JSON has no NaN). */
export function forResponse<T>(text: string): T {
  return JSON.parse(text, (_key, value: unknown) => (isNonFiniteTag(value) ? null : value)) as T;
}

/** The columns the content hash and its checks read. */
export type HashedBaseline = Pick<
  BaselineRow,
  | 'meter_id'
  | 'period_start'
  | 'period_end'
  | 'options_json'
  | 'inputs_json'
  | 'document_json'
  | 'fits_json'
  | 'chosen_model'
  | 'choice_reason'
  | 'content_hash'
  | 'temperature_form'
  | 'short_baseline_override'
  | 'extrapolation_override'
>;

/**
 * Content hash: SHA-256 of the canonical JSON of everything the frozen
 * baseline's figures rest on, read back from the stored columns:
 * { meterId, start, end, options, inputs, document, chosen: { model, reason, fit } },
 * plus overrides: { shortBaseline, extrapolation } (the reasons, null where
 * none) only when the baseline carries one, so the hash of every baseline
 * frozen without an override (all of those frozen before overrides existed)
 * is what it always was. The temperature form is not hashed separately: the
 * hashed fit document states it (see verifyBaselineContent).
 */
export function baselineContentHash(row: HashedBaseline): string {
  const fits = JSON.parse(row.fits_json) as Record<string, unknown>;
  const content: Record<string, unknown> = {
    meterId: row.meter_id,
    start: row.period_start,
    end: row.period_end,
    options: JSON.parse(row.options_json),
    inputs: JSON.parse(row.inputs_json),
    document: JSON.parse(row.document_json),
    chosen: { model: row.chosen_model, reason: row.choice_reason, fit: fits[row.chosen_model] ?? null },
  };
  const shortBaseline = row.short_baseline_override ?? null;
  const extrapolation = row.extrapolation_override ?? null;
  if (shortBaseline !== null || extrapolation !== null) content.overrides = { shortBaseline, extrapolation };
  return sha256Hex(canonicalJson(content));
}

/** The temperature form the stored fit document states; documents from before the form existed are mean-form fits. */
export function documentTemperatureForm(documentJson: string): 'daily' | 'mean' {
  const document = JSON.parse(documentJson) as { temperatureForm?: unknown };
  return document.temperatureForm === 'daily' ? 'daily' : 'mean';
}

/**
 * True when the row has a content hash, its stored content still gives it,
 * and its temperature_form column agrees with the form its hashed fit
 * document states (so the column cannot be changed unseen either).
 */
export function verifyBaselineContent(row: HashedBaseline): boolean {
  if (row.content_hash === null) return false;
  try {
    return (
      baselineContentHash(row) === row.content_hash &&
      row.temperature_form === documentTemperatureForm(row.document_json)
    );
  } catch {
    return false; // a column that no longer parses has been tampered with
  }
}

/**
 * verifyBaselineContent for a row whose options, inputs, document and fits
 * columns the caller has already parsed without error (deriveFrozenModel):
 * first the hash of the content written with those columns' own text in
 * place of their re-serialised form (they are canonical JSON as stored, so
 * this is the same text without parsing and writing 50 KB again), and only
 * when that differs the full computation. Each column is one valid JSON
 * value, so a text with the right SHA-256 is the hashed content itself.
 */
export function verifyParsedBaselineContent(row: HashedBaseline): boolean {
  if (row.content_hash === null) return false;
  try {
    if (row.temperature_form !== documentTemperatureForm(row.document_json)) return false;
    return splicedContentHash(row) === row.content_hash || baselineContentHash(row) === row.content_hash;
  } catch {
    return false;
  }
}

const SPLICED_COLUMNS = ['options', 'inputs', 'document'] as const;

function splicedContentHash(row: HashedBaseline): string {
  const raw = { options: row.options_json, inputs: row.inputs_json, document: row.document_json };
  const mark = (name: string) => `\u0000${name}\u0000`;
  const fits = JSON.parse(row.fits_json) as Record<string, unknown>;
  const content: Record<string, unknown> = {
    meterId: row.meter_id,
    start: row.period_start,
    end: row.period_end,
    options: mark('options'),
    inputs: mark('inputs'),
    document: mark('document'),
    chosen: { model: row.chosen_model, reason: row.choice_reason, fit: fits[row.chosen_model] ?? null },
  };
  const shortBaseline = row.short_baseline_override ?? null;
  const extrapolation = row.extrapolation_override ?? null;
  if (shortBaseline !== null || extrapolation !== null) content.overrides = { shortBaseline, extrapolation };
  let text = canonicalJson(content);
  // A user's text holding a mark only makes this hash differ: the full computation then decides.
  for (const name of SPLICED_COLUMNS) text = text.replace(JSON.stringify(mark(name)), () => raw[name]);
  return sha256Hex(text);
}
