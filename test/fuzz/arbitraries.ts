/**
 * fast-check generators of hostile values (numbers at the edges of a double,
 * impossible dates, Unicode that breaks naive code, SQL and prototype
 * pollution fragments, deep nests, bare NaN tokens; from common practice in
 * input fuzzing) and of schema-guided values read from the OpenAPI request
 * schemas, where each node is valid or, at a chosen rate, hostile. Some
 * generated requests are valid; the properties accept that.
 */
import fc from 'fast-check';
import { JsonEntries, RawJson, type JsonValue } from './json-text.js';
import type { JsonSchema } from './openapi-routes.js';

// ---------------------------------------------------------------- numbers

/** The edges of IEEE-754 doubles and of the integers JavaScript holds exactly. */
export const EDGE_NUMBERS: readonly number[] = [
  1e308,
  -1e308,
  5e-324,
  -5e-324,
  -0,
  0,
  1,
  -1,
  0.5,
  1e-7,
  2 ** 31,
  -(2 ** 31) - 1,
  2 ** 53,
  2 ** 53 + 2,
  -(2 ** 53),
  1e21,
  123456789.123456,
  Number.MAX_VALUE,
  Number.EPSILON,
];

/** Tokens JSON does not allow as numbers, or allows with surprising values (1e999 parses as Infinity). */
export const RAW_NUMBER_TOKENS: readonly string[] = [
  'NaN',
  'Infinity',
  '-Infinity',
  '+Infinity',
  '1e999',
  '-1e999',
  '1e-999',
  '-0',
  '-0.0',
  '0x10',
  '01',
  '.5',
  '+1',
  '1.',
  '1e',
  '1e+',
  '--1',
  '9'.repeat(400),
  `0.${'0'.repeat(400)}1`,
  'undefined',
  'nil',
  'None',
  'True',
];

export const hostileNumber: fc.Arbitrary<number> = fc.oneof(
  fc.constantFrom(...EDGE_NUMBERS),
  fc.double({ noNaN: true, noDefaultInfinity: true }),
  fc.integer(),
  fc.double({ min: -1e6, max: 1e6, noNaN: true }),
);

// ---------------------------------------------------------------- dates

/** Impossible, ambiguous or time-bearing dates for YYYY-MM-DD fields. */
export const HOSTILE_DATES: readonly string[] = [
  '2025-02-30',
  '2024-13-01',
  '0000-00-00',
  '2023-02-29',
  '2025-04-31',
  '2025-00-10',
  '2025-01-32',
  '2025-01-00',
  '99999-01-01',
  '-2025-01-01',
  '+002025-01-01',
  '2025-1-1',
  '20250101',
  '2025/01/01',
  '01/02/2025',
  '2025-01-01T00:00:00+05:00',
  '2025-01-01T00:00:00Z',
  '2025-01-01T23:59:60Z',
  '2025-01-01 00:00',
  '2025-01-01T24:00:00Z',
  '2025-W01-1',
  '2025-001',
  '0001-01-01',
  '9999-12-31',
  '1970-01-01',
  '1900-02-29',
  '2000-02-29',
  '２０２５-０１-０１',
  '٢٠٢٥-٠١-٠١',
  '2025-01-01\n',
  ' 2025-01-01',
  '2025-01-01 ',
  '2025-01-01\u0000',
  '\u202e2025-01-01',
  '2025-01-01T00:00:00.000000000001Z',
  'today',
  'now',
  'Invalid Date',
  '',
];

/** Real dates, mostly near the seeded ledger (2022–2027) and at month starts as bills are, some centuries away. */
export const plausibleDate: fc.Arbitrary<string> = fc.oneof(
  {
    weight: 3,
    arbitrary: fc
      .tuple(fc.integer({ min: 2022, max: 2027 }), fc.integer({ min: 1, max: 12 }))
      .map(([y, m]) => `${y}-${String(m).padStart(2, '0')}-01`),
  },
  {
    weight: 2,
    arbitrary: fc
      .date({ min: new Date('2022-01-01T00:00:00Z'), max: new Date('2027-12-31T00:00:00Z'), noInvalidDate: true })
      .map((d) => d.toISOString().slice(0, 10)),
  },
  { weight: 1, arbitrary: fc.constantFrom('2023-01-01', '2025-01-01', '2026-01-01', '2024-02-29', '2024-12-31') },
  // Real but far-off dates: centuries of days between two of them.
  {
    weight: 1,
    arbitrary: fc.constantFrom(
      '0001-01-01',
      '1000-03-01',
      '1900-01-01',
      '1970-01-01',
      '2000-02-29',
      '2100-01-01',
      '9999-12-31',
    ),
  },
);

// ---------------------------------------------------------------- text

/** Characters that break naive text handling: controls, NUL, bidi marks, joiners, combining marks, lone surrogates, quotes. */
export const AWKWARD_CHARACTERS: readonly string[] = [
  '\u0000',
  '\u0001',
  '\u0008',
  '\u001b',
  '\u001f',
  '\u007f',
  '\u0085',
  '\u200b',
  '\u200e',
  '\u200f',
  '\u202a',
  '\u202e',
  '\u2066',
  '\u2069',
  '\ufeff',
  '\ufffd',
  '\ufffe',
  '\uffff',
  '\ud800',
  '\udfff',
  '\u0301',
  'e\u0301',
  'Z\u0351\u0360\u0489',
  '😀',
  '👩‍👩‍👧',
  '🏳️‍🌈',
  '𝔘',
  'İ',
  'ß',
  'Ω',
  'ﷺ',
  '\n',
  '\r',
  '\t',
  '\u2028',
  '\u2029',
  '"',
  '\\',
  "'",
  '`',
  '<',
  '>',
  '&',
  '%',
  '/',
  '.',
  ',',
  ';',
  ' ',
  'a',
  '1',
];

/** SQL, path and prototype fragments, and strings that look like other types. */
export const HOSTILE_STRINGS: readonly string[] = [
  "'; drop table readings; --",
  '1 OR 1=1',
  "' OR '1'='1",
  '1; select * from api_keys',
  '") or ("1"="1',
  '%27%20OR%201=1',
  '\\x27',
  '__proto__',
  'constructor',
  'prototype',
  'toString',
  'hasOwnProperty',
  '../',
  '../../etc/passwd',
  '..\\..\\windows',
  '%2e%2e%2f',
  '%00',
  'NaN',
  'Infinity',
  '-Infinity',
  '1e308',
  '-0',
  'null',
  'true',
  'false',
  'undefined',
  '0',
  '[]',
  '{}',
  '',
  ' ',
  '   ',
  '\t\n',
  '=1+2',
  '@SUM(A1)',
  '+cmd',
  '<script>alert(1)</script>',
  '${7*7}',
  '{{7*7}}',
  '\u202egnp.exe',
  '\u0000',
  'x'.repeat(201),
  'y'.repeat(2001),
  'é'.repeat(201),
  '😀'.repeat(101),
];

export const awkwardText: fc.Arbitrary<string> = fc.oneof(
  fc.string({ unit: fc.constantFrom(...AWKWARD_CHARACTERS), maxLength: 24 }),
  fc.string({ unit: 'binary', maxLength: 24 }),
  fc.string({ unit: 'grapheme', maxLength: 24 }),
  fc.constantFrom(...HOSTILE_STRINGS),
);

/** Readable text, the kind a person would type into a name or a reason. */
const readableText: fc.Arbitrary<string> = fc.oneof(
  fc.constantFrom(
    'Invented annex',
    'North wing (invented)',
    'Agreed in the M&V plan',
    'Meter exchange',
    'kWh',
    'therm',
    'm3',
    'Re-read after audit',
  ),
  fc.string({ unit: 'grapheme-ascii', minLength: 1, maxLength: 30 }),
);

// ---------------------------------------------------------------- structures

/** Object keys that attack prototypes or confuse parsers. */
export const HOSTILE_KEYS: readonly string[] = [
  '__proto__',
  'constructor',
  'prototype',
  'toString',
  'valueOf',
  '',
  ' ',
  '$where',
  '0',
  'a.b',
  'a[0]',
  '\u0000',
  '😀',
];

/** `[[[…]]]` or `{"a":{"a":…}}` nested `depth` deep. */
export function deepNest(depth: number, kind: 'array' | 'object'): RawJson {
  return kind === 'array'
    ? new RawJson(`${'['.repeat(depth)}${']'.repeat(depth)}`)
    : new RawJson(`${'{"a":'.repeat(depth)}1${'}'.repeat(depth)}`);
}

const deepNestArb: fc.Arbitrary<JsonValue> = fc
  .tuple(fc.constantFrom(2, 64, 1000, 5000), fc.constantFrom('array' as const, 'object' as const))
  .map(([depth, kind]) => deepNest(kind === 'object' ? Math.min(depth, 1000) : depth, kind));

const scalar: fc.Arbitrary<JsonValue> = fc.oneof(
  hostileNumber,
  awkwardText,
  fc.constantFrom(...HOSTILE_DATES),
  fc.boolean(),
  fc.constant(null),
  fc.constantFrom(...RAW_NUMBER_TOKENS).map((t) => new RawJson(t)),
);

/** Any hostile JSON value: a scalar, a small container (maybe with hostile keys), or a deep nest. */
export const hostileValue: fc.Arbitrary<JsonValue> = fc.oneof(
  { weight: 8, arbitrary: scalar },
  { weight: 2, arbitrary: fc.array(scalar, { maxLength: 3 }) },
  {
    weight: 2,
    arbitrary: fc
      .array(fc.tuple(fc.oneof(fc.constantFrom(...HOSTILE_KEYS), fc.string({ maxLength: 8 })), scalar), {
        maxLength: 3,
      })
      .map((entries) => new JsonEntries(entries)),
  },
  { weight: 1, arbitrary: deepNestArb },
);

// ---------------------------------------------------------------- schema-guided values

export interface SchemaContext {
  /** Real ids to use for string fields that name another entity (…Id). */
  realIds: readonly string[];
}

const clampLength = (min: number | undefined, max: number | undefined) => ({
  minLength: min ?? 0,
  maxLength: Math.min(max ?? 40, 40),
});

function validString(schema: JsonSchema, name: string, ctx: SchemaContext): fc.Arbitrary<string> {
  if (schema.format === 'date') return plausibleDate;
  if (/Id$/.test(name) && ctx.realIds.length > 0)
    return fc.oneof({ weight: 3, arbitrary: fc.constantFrom(...ctx.realIds) }, { weight: 1, arbitrary: awkwardText });
  const { minLength, maxLength } = clampLength(schema.minLength, schema.maxLength);
  return fc
    .oneof(readableText, awkwardText)
    .filter((s) => s.length >= minLength && s.length <= maxLength && s.trim().length >= Math.min(minLength, 1));
}

function validNumber(schema: JsonSchema, integer: boolean): fc.Arbitrary<number> {
  const low = schema.minimum ?? (schema.exclusiveMinimum !== undefined ? schema.exclusiveMinimum : -1000);
  const high = schema.maximum ?? (schema.exclusiveMaximum !== undefined ? schema.exclusiveMaximum : 100_000);
  const fits = (v: number) =>
    (schema.minimum === undefined || v >= schema.minimum) &&
    (schema.maximum === undefined || v <= schema.maximum) &&
    (schema.exclusiveMinimum === undefined || v > schema.exclusiveMinimum) &&
    (schema.exclusiveMaximum === undefined || v < schema.exclusiveMaximum) &&
    (!integer || Number.isSafeInteger(v));
  // The edges of a double that the schema still allows (1e308 for an unbounded quantity, 5e-324 for "above 0").
  const edges = EDGE_NUMBERS.filter(fits);
  const bounded = schema.minimum ?? schema.maximum ?? schema.exclusiveMinimum ?? schema.exclusiveMaximum;
  const inRange = integer
    ? fc.integer({ min: Math.ceil(low), max: Math.floor(Math.min(high, 2 ** 31)) })
    : bounded !== undefined
      ? fc.double({ min: low, max: high, noNaN: true, noDefaultInfinity: true }).filter(fits)
      : // Unbounded in the schema: temperatures and quantities a service would take, so requests get past its own checks.
        fc.oneof(fc.double({ min: -40, max: 120, noNaN: true }), fc.double({ min: 0, max: 100_000, noNaN: true }));
  return edges.length > 0
    ? fc.oneof({ weight: 6, arbitrary: inRange }, { weight: 1, arbitrary: fc.constantFrom(...edges) })
    : inRange;
}

const typesOf = (schema: JsonSchema): string[] =>
  Array.isArray(schema.type) ? schema.type : schema.type ? [schema.type] : [];

/** A value that fits the schema (arrays kept short); no hostility. */
function validValue(schema: JsonSchema, name: string, ctx: SchemaContext, hostility: number): fc.Arbitrary<JsonValue> {
  if (schema.enum) return fc.constantFrom(...(schema.enum as JsonValue[]));
  const alternatives = schema.anyOf ?? schema.oneOf;
  if (alternatives) return fc.oneof(...alternatives.map((s) => valueFor(s, name, ctx, hostility)));
  const types = typesOf(schema);
  if (types.length > 1) return fc.oneof(...types.map((type) => valueFor({ ...schema, type }, name, ctx, hostility)));
  switch (types[0]) {
    case 'null':
      return fc.constant(null);
    case 'boolean':
      return fc.boolean();
    case 'integer':
      return validNumber(schema, true);
    case 'number':
      return validNumber(schema, false);
    case 'string':
      return validString(schema, name, ctx);
    case 'array': {
      const item = schema.items ?? {};
      return fc.array(valueFor(item, name, ctx, hostility), {
        minLength: schema.minItems ?? 0,
        // Short arrays keep runs quick, but never shorter than the schema's minimum (a week's seven day types).
        maxLength: Math.max(schema.minItems ?? 0, Math.min(schema.maxItems ?? 3, 3)),
      });
    }
    case 'object':
      return objectValue(schema, ctx, hostility);
    default:
      return hostileValue;
  }
}

/** An object from its properties; with hostility, keys go missing, repeat, or hostile keys are added. */
function objectValue(schema: JsonSchema, ctx: SchemaContext, hostility: number): fc.Arbitrary<JsonValue> {
  const properties = Object.entries(schema.properties ?? {});
  const required = new Set(schema.required ?? []);
  const fields = properties.map(([key, property]) =>
    required.has(key)
      ? valueFor(property, key, ctx, hostility).map((v): [string, JsonValue][] => [[key, v]])
      : fc
          .option(valueFor(property, key, ctx, hostility), { nil: undefined, freq: 2 })
          .map((v): [string, JsonValue][] => (v === undefined ? [] : [[key, v]])),
  );
  const base = fc.tuple(...fields).map((groups) => groups.flat());
  if (hostility === 0) return base.map((entries) => new JsonEntries(entries));
  const scale = Math.max(1, Math.round(hostility * 20));
  const mutation = fc.oneof(
    { weight: 20, arbitrary: fc.constant({ kind: 'none' as const }) },
    { weight: scale, arbitrary: fc.nat().map((index) => ({ kind: 'drop' as const, index })) },
    {
      weight: scale,
      arbitrary: fc
        .tuple(fc.nat(), hostileValue)
        .map(([index, value]) => ({ kind: 'duplicate' as const, index, value })),
    },
    {
      weight: scale,
      arbitrary: fc
        .tuple(
          fc.oneof(
            fc.constantFrom(...HOSTILE_KEYS),
            fc.string({ maxLength: 10 }),
            fc.constantFrom(...properties.map(([k]) => `${k} `), 'x'),
          ),
          hostileValue,
        )
        .map(([key, value]) => ({ kind: 'extra' as const, key, value })),
    },
  );
  return fc.tuple(base, mutation).map(([entries, change]) => {
    const out = [...entries];
    if (change.kind === 'drop' && out.length > 0) out.splice(change.index % out.length, 1);
    if (change.kind === 'duplicate' && out.length > 0) out.push([out[change.index % out.length]![0], change.value]);
    if (change.kind === 'extra') out.push([change.key, change.value]);
    return new JsonEntries(out);
  });
}

/** A value for one schema node: valid, or (with probability `hostility`) hostile. */
export function valueFor(
  schema: JsonSchema,
  name: string,
  ctx: SchemaContext,
  hostility: number,
): fc.Arbitrary<JsonValue> {
  const valid = validValue(schema, name, ctx, hostility);
  if (hostility === 0) return valid;
  const hostileWeight = Math.max(1, Math.round(hostility * 100));
  return fc.oneof(
    { weight: 100 - hostileWeight, arbitrary: valid },
    { weight: hostileWeight, arbitrary: hostileValue },
  );
}

/** A body for the schema at a random level of hostility (0: valid, up to half the nodes hostile). */
export function schemaBody(schema: JsonSchema, ctx: SchemaContext): fc.Arbitrary<JsonValue> {
  // Mostly hostile: a valid write costs a digest and changes the ledger the next requests see.
  const level = fc.oneof(
    { weight: 1, arbitrary: fc.constant(0) },
    { weight: 2, arbitrary: fc.constant(0.03) },
    { weight: 3, arbitrary: fc.constantFrom(0.1, 0.3, 0.5) },
  );
  return level.chain((hostility) => valueFor(schema, '(body)', ctx, hostility));
}
