/**
 * Whole requests for one route: a path with real or hostile ids, a query
 * with repeated, empty or unknown keys, a body that is schema-guided and
 * partly hostile, raw broken JSON, CSV with hostile cells, the wrong content
 * type or just over the body limit, and a key of some role (or none).
 */
import fc from 'fast-check';
import {
  HOSTILE_DATES,
  HOSTILE_STRINGS,
  RAW_NUMBER_TOKENS,
  awkwardText,
  deepNest,
  hostileValue,
  plausibleDate,
  schemaBody,
  valueFor,
} from './arbitraries.js';
import { jsonText, type JsonValue } from './json-text.js';
import type { FuzzRoute, JsonSchema } from './openapi-routes.js';
import type { SeededIds } from './fuzz-api.js';

export interface FuzzRequest {
  method: string;
  url: string;
  headers: Record<string, string>;
  payload?: string | Buffer;
  /** Which part of the request was made hostile, for the figures. */
  kind: string;
}

export interface RequestContext {
  ids: SeededIds;
  /** Bearer tokens by who holds them. */
  tokens: { admin: string; engineer: string; analyst: string; integration: string; other: string };
  bodyLimit: number;
}

/** encodeURIComponent that first swaps lone surrogates (which it cannot encode) for U+FFFD. */
const encode = (text: string): string =>
  encodeURIComponent(text.replace(/[\ud800-\udbff](?![\udc00-\udfff])|(?<![\ud800-\udbff])[\udc00-\udfff]/g, '\ufffd'));

// ---------------------------------------------------------------- path

/** Path segments that are already URL text: traversal, broken percent-encoding, NUL, long ids. */
const RAW_ID_SEGMENTS: readonly string[] = [
  '..',
  '.',
  '../',
  '..%2F..%2Fapi-keys',
  '%2e%2e',
  '%2e%2e%2f',
  '%00',
  '%',
  '%zz',
  '%E0%A4%A',
  '%C0%AE',
  '%ff',
  'a%2Fb',
  '%20',
  '+',
  '%2B',
  '%0d%0aX-Injected:%201',
  '__proto__',
  'constructor',
  'null',
  'undefined',
  '0',
  '-1',
  '1e308',
  'NaN',
  '%F0%9F%98%80',
  '%EF%BB%BF',
  '~',
  '*',
  'x'.repeat(100),
  'x'.repeat(101),
  'x'.repeat(5000),
  ';',
  ',',
  '@',
  '$',
  '!',
  "'",
  '(',
  ')',
];

const POOLS: Record<string, keyof SeededIds> = {
  'weather-stations': 'stations',
  facilities: 'facilities',
  meters: 'meters',
  baselines: 'baselines',
  'api-keys': 'apiKeys',
};

function idSegment(route: FuzzRoute, ctx: RequestContext): fc.Arbitrary<{ text: string; real: boolean }> {
  const collection = route.path.split('/')[2] ?? '';
  const own = ctx.ids[POOLS[collection] ?? 'meters'];
  const anyReal = [
    ...ctx.ids.stations,
    ...ctx.ids.facilities,
    ...ctx.ids.meters,
    ...ctx.ids.baselines,
    ...ctx.ids.apiKeys,
  ];
  const real = (list: readonly string[]) => fc.constantFrom(...list).map((text) => ({ text, real: true }));
  return fc.oneof(
    { weight: 5, arbitrary: real(own) },
    { weight: 1, arbitrary: real(anyReal) },
    { weight: 1, arbitrary: real(ctx.ids.otherOrganisation) },
    { weight: 2, arbitrary: fc.constantFrom(...RAW_ID_SEGMENTS).map((text) => ({ text, real: false })) },
    { weight: 2, arbitrary: awkwardText.map((s) => ({ text: encode(s), real: false })) },
    {
      weight: 1,
      arbitrary: fc
        .tuple(fc.constantFrom(...own), fc.constantFrom('/', '%00', '%2F..', '.json', '?', '#x', ' ', 'x', '%20'))
        .map(([id, tail]) => ({ text: `${id}${tail === ' ' ? '%20' : tail}`, real: false })),
    },
    { weight: 1, arbitrary: fc.constantFrom(...own).map((id) => ({ text: id.toUpperCase(), real: false })) },
  );
}

function pathArb(route: FuzzRoute, ctx: RequestContext): fc.Arbitrary<{ path: string; hostile: boolean }> {
  if (route.pathParams.length === 0) return fc.constant({ path: route.path, hostile: false });
  return fc.tuple(...route.pathParams.map(() => idSegment(route, ctx))).map((segments) => {
    let path = route.path;
    route.pathParams.forEach((name, i) => {
      path = path.replace(`{${name}}`, segments[i]!.text);
    });
    return { path, hostile: segments.some((s) => !s.real) };
  });
}

// ---------------------------------------------------------------- query

const QUERY_VALUES: readonly string[] = [
  '',
  ' ',
  '1e3',
  '0x10',
  ' 5',
  '5 ',
  '1.5',
  '-1',
  '0',
  '1000',
  '1001',
  '9007199254740993',
  '9'.repeat(30),
  '1e308',
  '0b11',
  '10_0',
  '0.68',
  '0.95',
  '.95',
  '95',
  'meter',
  'baseline',
  'weather-station',
  'api-key',
  'METER',
  'a'.repeat(51),
  '%zz',
  '%00',
  '%2B1',
  '+1',
  '%26x%3D1',
  ...RAW_NUMBER_TOKENS.slice(0, 8),
];

function queryValue(schema: JsonSchema | undefined, name: string, ctx: RequestContext): fc.Arbitrary<string> {
  const guided =
    schema === undefined
      ? awkwardText
      : valueFor(schema, name, { realIds: [...ctx.ids.meters, ...ctx.ids.baselines] }, 0).map((v) =>
          typeof v === 'string' ? v : jsonText(v as JsonValue),
        );
  return fc.oneof(
    { weight: 4, arbitrary: guided.map(encode) },
    { weight: 2, arbitrary: fc.constantFrom(...QUERY_VALUES) },
    {
      weight: 2,
      arbitrary: fc.oneof(fc.constantFrom(...HOSTILE_DATES, ...HOSTILE_STRINGS), awkwardText).map((s) => encode(s)),
    },
    { weight: 1, arbitrary: plausibleDate.map((d) => `${d}T00:00:00${encode('+05:00')}`) },
  );
}

const UNKNOWN_QUERY_KEYS: readonly string[] = [
  'foo',
  '__proto__',
  'constructor',
  'from[]',
  'from[0]',
  'limit.x',
  '',
  'FROM',
  'correctionreason',
  '%00',
  'toString',
];

function queryArb(route: FuzzRoute, ctx: RequestContext): fc.Arbitrary<{ query: string; hostile: boolean }> {
  const known = Object.keys(route.query);
  const keyArb =
    known.length > 0
      ? fc.oneof(
          { weight: 6, arbitrary: fc.constantFrom(...known) },
          { weight: 1, arbitrary: fc.constantFrom(...UNKNOWN_QUERY_KEYS) },
        )
      : fc.constantFrom(...UNKNOWN_QUERY_KEYS);
  const pair = keyArb.chain((key) =>
    fc.oneof(
      { weight: 8, arbitrary: queryValue(route.query[key], key, ctx).map((value) => `${encode(key)}=${value}`) },
      { weight: 1, arbitrary: fc.constant(encode(key)) },
      { weight: 1, arbitrary: fc.constant(`${encode(key)}=`) },
    ),
  );
  return fc.oneof(
    { weight: known.length > 0 ? 3 : 6, arbitrary: fc.constant({ query: '', hostile: false }) },
    // Some keys, maybe repeated; the separators themselves can be odd too.
    {
      weight: 4,
      arbitrary: fc
        .tuple(fc.array(pair, { minLength: 1, maxLength: 5 }), fc.constantFrom('&', '&', '&', '&&', ';'), fc.boolean())
        .map(([pairs, sep, repeat]) => ({
          query: `?${(repeat ? [...pairs, pairs[0]!] : pairs).join(sep)}`,
          hostile: true,
        })),
    },
    {
      weight: 1,
      arbitrary: fc
        .constantFrom('?', '?&', '?=', '?==&&', '?a=1&a=2&a=3', '?%zz=1', `?${'q'.repeat(5000)}=1`)
        .map((query) => ({ query, hostile: true })),
    },
  );
}

// ---------------------------------------------------------------- bodies

interface Body {
  payload?: string | Buffer;
  contentType?: string;
  kind: string;
}

const BROKEN_JSON: readonly string[] = [
  '',
  ' ',
  '\n',
  'null',
  '""',
  '0',
  '-0',
  '[]',
  '{}',
  'true',
  '"text"',
  '{',
  '}',
  '[',
  '{"a":1,}',
  '[1,]',
  '{a:1}',
  "{'a':1}",
  '{"a":1}{"b":2}',
  '{"a":1} x',
  '// comment\n{}',
  '/* c */{}',
  '\ufeff{}',
  '{"a":"\\u12"}',
  '{"a":"\\x41"}',
  '{"a":"\u0000"}',
  '{"a" 1}',
  '{"a":01}',
  '{"a":.5}',
  '{"__proto__":{"polluted":true}}',
  '{"constructor":{"prototype":{"polluted":true}}}',
  '{"a":1,"a":2,"a":3}',
  'NaN',
  'Infinity',
  '{"a":NaN}',
  '{"a":Infinity}',
  '{"a":-Infinity}',
  '{"a":1e999}',
  '[NaN,Infinity]',
];

const WRONG_CONTENT_TYPES: readonly string[] = [
  'text/plain',
  'application/xml',
  'text/xml',
  'multipart/form-data; boundary=fuzz',
  'application/x-www-form-urlencoded',
  'application/octet-stream',
  'application/json; charset=utf-16',
  'application/json; charset=latin1',
  'APPLICATION/JSON',
  'application/json ; charset=utf-8',
  'application/jsonx',
  'application/problem+json',
  'application/vnd.api+json',
  'application/*',
  '*/*',
  'json',
  'text/csv; charset=utf-16',
  'text/html',
  ';',
  'a/b/c',
];

const XML_BODY =
  '<?xml version="1.0"?><!DOCTYPE x [<!ENTITY e SYSTEM "file:///etc/passwd">]><body><name>&e;</name></body>';
const MULTIPART_BODY =
  '--fuzz\r\nContent-Disposition: form-data; name="name"\r\n\r\nInvented hall\r\n--fuzz\r\nContent-Disposition: form-data; name="file"; filename="a.csv"\r\nContent-Type: text/csv\r\n\r\nstart,end,quantity\r\n--fuzz--\r\n';

/** The columns a CSV route takes, read from the body schema's collection items. */
function csvColumns(route: FuzzRoute): { collection: string; columns: string[] } | null {
  // The records' array (a calendar's body also holds arrays of plain names, which a CSV does not carry).
  const [collection, array] =
    Object.entries(route.body?.properties ?? {}).find(([, s]) => s.type === 'array' && s.items?.properties) ?? [];
  if (!collection || !array?.items?.properties) return null;
  return { collection, columns: Object.keys(array.items.properties) };
}

const HOSTILE_CELLS: readonly string[] = [
  '',
  ' ',
  '=1+2',
  '=HYPERLINK("x")',
  '+cmd|calc',
  '-1',
  '@SUM(A1)',
  'NaN',
  'Infinity',
  '-Infinity',
  '1e999',
  '1e308',
  '5e-324',
  '-0',
  '0x10',
  '"1,5"',
  '"unterminated',
  'a"b',
  '""',
  '\u0000',
  '😀',
  '١٢٣',
  ' 12 ',
  '12 kWh',
  'TRUE',
  'yes',
  'no',
  'maybe',
  'Y',
  '1',
  '0',
  'null',
  'x'.repeat(3000),
  "'; drop table readings; --",
  '1 OR 1=1',
  '__proto__',
  ...HOSTILE_DATES.filter((d) => !/[\n,]/.test(d)),
];

function csvCell(column: string): fc.Arbitrary<string> {
  const plausible =
    column === 'date' || column === 'start' || column === 'end'
      ? plausibleDate
      : column === 'estimated'
        ? fc.constantFrom('true', 'false', 'yes', 'no', '1', '0')
        : column === 'dayType' || column === 'note'
          ? fc.constantFrom('working', 'weekend', 'break', 'holiday')
          : fc.double({ min: -50, max: 5000, noNaN: true }).map((v) => String(Math.round(v * 10) / 10));
  return fc.oneof(
    { weight: 5, arbitrary: plausible },
    { weight: 2, arbitrary: fc.constantFrom(...HOSTILE_CELLS) },
    { weight: 1, arbitrary: awkwardText },
  );
}

function csvBody(route: FuzzRoute): fc.Arbitrary<string> {
  const spec = csvColumns(route);
  const allColumns = spec?.columns ?? ['start', 'end', 'quantity'];
  const header = fc.oneof(
    { weight: 5, arbitrary: fc.shuffledSubarray(allColumns, { minLength: 1 }) },
    { weight: 2, arbitrary: fc.constant(allColumns) },
    {
      weight: 1,
      arbitrary: fc
        .tuple(
          fc.shuffledSubarray(allColumns, { minLength: 1 }),
          fc.constantFrom('extra', '', 'START', ' start', '"date"', '__proto__', allColumns[0]!),
        )
        .map(([c, x]) => [...c, x]),
    },
  );
  return fc
    .tuple(
      header,
      fc.array(fc.nat({ max: 10 }), { maxLength: 6 }),
      fc.constantFrom('\n', '\r\n', '\r'),
      fc.boolean(),
      fc.constantFrom('', '', '', '\ufeff', '\n\n', '# comment\n'),
    )
    .chain(([columns, rowShapes, eol, trailing, prefix]) =>
      fc
        .tuple(
          ...rowShapes.map((shape) =>
            fc
              .tuple(...columns.map((c) => csvCell(c)))
              .map((cells) => (shape === 0 ? cells.slice(0, -1) : shape === 1 ? [...cells, '9'] : cells)),
          ),
        )
        .map(
          (rows) => `${prefix}${[columns.join(','), ...rows.map((r) => r.join(','))].join(eol)}${trailing ? eol : ''}`,
        ),
    );
}

/**
 * A CSV batch the route should take: far-future months (so batches rarely
 * overlap what is stored) with modest numbers, under the header its columns allow.
 */
function plausibleCsv(route: FuzzRoute): fc.Arbitrary<string> {
  const columns = csvColumns(route)?.columns ?? [];
  const periods = columns.includes('start') && columns.includes('end');
  const header = periods ? ['start', 'end', 'quantity'] : columns.includes('date') ? ['date', 'temp'] : columns;
  return fc
    .tuple(fc.integer({ min: 2100, max: 9000 }), fc.integer({ min: 1, max: 3 }), fc.integer({ min: 0, max: 90 }))
    .map(([year, count, value]) => {
      const month = (m: number) => `${year}-${String(m).padStart(2, '0')}-01`;
      const rows = Array.from({ length: count }, (_, i) =>
        periods ? [month(i + 1), month(i + 2), value + i] : [month(i + 1), value - 20 + i],
      );
      return [header.join(','), ...rows.map((r) => r.join(','))].join('\n');
    });
}

function oversizeBody(route: FuzzRoute, limit: number): fc.Arbitrary<Body> {
  return fc.tuple(fc.integer({ min: 1, max: 2048 }), fc.boolean()).map(([over, asCsv]) => {
    const size = limit + over;
    if (asCsv && route.takesCsv) {
      const head = 'start,end,quantity\n';
      const row = '2031-01-01,2031-02-01,100\n';
      const text = head + row.repeat(Math.ceil((size - head.length) / row.length));
      return { payload: text.slice(0, size), contentType: 'text/csv', kind: 'oversize' };
    }
    const open = '{"name":"';
    return {
      payload: `${open}${'x'.repeat(size - open.length - 2)}"}`,
      contentType: 'application/json',
      kind: 'oversize',
    };
  });
}

/** Deep nests on their own: a body no schema looks at may still reach code that recurses. */
const deepBody: fc.Arbitrary<Body> = fc
  .constantFrom<[number, 'array' | 'object']>(
    [1000, 'array'],
    [5000, 'array'],
    [8000, 'array'],
    [1000, 'object'],
    [2500, 'object'],
  )
  .map(([depth, kind]) => ({
    payload: jsonText(deepNest(depth, kind)),
    contentType: 'application/json',
    kind: 'deep-json',
  }));

function bodyArb(route: FuzzRoute, ctx: RequestContext): fc.Arbitrary<Body> {
  const schemaCtx = { realIds: [...ctx.ids.stations, ...ctx.ids.otherOrganisation] };
  const guided = route.body ? schemaBody(route.body, schemaCtx) : hostileValue;
  const json =
    (kind: string) =>
    (value: JsonValue): Body => ({ payload: jsonText(value), contentType: 'application/json', kind });
  const kinds: { weight: number; arbitrary: fc.Arbitrary<Body> }[] = [
    { weight: route.body ? 10 : 1, arbitrary: guided.map(json(route.body ? 'schema-body' : 'unexpected-body')) },
    {
      weight: 2,
      arbitrary: fc
        .oneof(
          fc.constantFrom(...BROKEN_JSON),
          guided
            .map((v) => jsonText(v))
            .chain((text) => fc.nat({ max: Math.max(0, text.length - 1) }).map((cut) => text.slice(0, cut))),
          fc.constantFrom(1000, 5000).map((depth) => jsonText(deepNest(depth, 'array'))),
          fc.constant(jsonText(deepNest(1000, 'object'))),
        )
        .map((payload) => ({ payload, contentType: 'application/json', kind: 'raw-json' })),
    },
    {
      weight: 1,
      arbitrary: fc
        .tuple(
          guided.map((v) => jsonText(v)),
          fc.constantFrom(...WRONG_CONTENT_TYPES),
          fc.nat({ max: 3 }),
        )
        .map(([text, contentType, variant]) => ({
          payload: contentType.startsWith('multipart')
            ? MULTIPART_BODY
            : contentType.includes('xml') && variant > 0
              ? XML_BODY
              : text,
          contentType,
          kind: 'content-type',
        })),
    },
    { weight: 1, arbitrary: deepBody },
    // Bytes that are not UTF-8 at all, declared as JSON.
    {
      weight: 1,
      arbitrary: fc.uint8Array({ minLength: 1, maxLength: 64 }).map((bytes) => ({
        payload: Buffer.concat([Buffer.from('{"name":"'), Buffer.from(bytes), Buffer.from('"}')]),
        contentType: 'application/json',
        kind: 'raw-bytes',
      })),
    },
    {
      weight: route.takesCsv ? 6 : 1,
      arbitrary: csvBody(route).map((payload) => ({ payload, contentType: 'text/csv', kind: 'csv' })),
    },
    {
      weight: route.takesCsv ? 1 : 0,
      arbitrary: plausibleCsv(route).map((payload) => ({ payload, contentType: 'text/csv', kind: 'csv-plausible' })),
    },
    // CSV text inside a JSON string: JSON, so it must not be read as CSV.
    {
      weight: route.takesCsv ? 1 : 0,
      arbitrary: fc
        .oneof(plausibleCsv(route), csvBody(route))
        .map((text) => ({ payload: JSON.stringify(text), contentType: 'application/json', kind: 'csv-in-json' })),
    },
    { weight: 1, arbitrary: oversizeBody(route, ctx.bodyLimit) },
    { weight: 1, arbitrary: fc.constant({ kind: 'no-body' }) },
    { weight: 1, arbitrary: guided.map((v) => ({ payload: jsonText(v), kind: 'no-content-type' })) },
  ];
  const some = kinds.filter((k) => k.weight > 0);
  if (route.body) return fc.oneof(...some);
  // Routes without a body: mostly none, sometimes one anyway.
  return fc.oneof(
    { weight: 8, arbitrary: fc.constant({ kind: 'no-body' }) },
    { weight: 2, arbitrary: fc.oneof(...some) },
    { weight: 1, arbitrary: deepBody },
  );
}

// ---------------------------------------------------------------- headers

function authArb(route: FuzzRoute, ctx: RequestContext): fc.Arbitrary<{ authorization?: string; kind: string | null }> {
  const bearer = (token: string) => `Bearer ${token}`;
  const t = ctx.tokens;
  return fc
    .oneof(
      { weight: 30, arbitrary: fc.constant({ authorization: bearer(t.admin), kind: null }) },
      {
        weight: 6,
        arbitrary: fc
          .constantFrom(t.engineer, t.analyst, t.integration)
          .map((token) => ({ authorization: bearer(token), kind: 'role' })),
      },
      { weight: 2, arbitrary: fc.constant({ authorization: bearer(t.other), kind: 'other-organisation' }) },
      { weight: 1, arbitrary: fc.constant({ kind: 'no-key' }) },
      {
        weight: 3,
        arbitrary: fc
          .constantFrom(
            'Bearer',
            'Bearer ',
            `bearer ${t.admin}`,
            t.admin,
            `Basic ${Buffer.from('admin:admin').toString('base64')}`,
            `Bearer ${t.admin}x`,
            `Bearer ${t.admin.slice(0, -1)}`,
            `Bearer  ${t.admin}  `,
            `Bearer mvl_AAAAAAAA_${'a'.repeat(40)}`,
            `Bearer mvl_${'A'.repeat(8)}_${'a'.repeat(10_000)}`,
            `Bearer ${t.admin},${t.admin}`,
            "Bearer ' OR 1=1 --",
            'Bearer __proto__',
          )
          .map((authorization) => ({ authorization, kind: 'bad-key' })),
      },
    )
    .map((auth) => (route.secured ? auth : { ...auth, kind: null }));
}

let idempotencyCounter = 0;
const idempotencyArb: fc.Arbitrary<{ key?: string; hostile: boolean }> = fc.oneof(
  { weight: 10, arbitrary: fc.constant({ hostile: false }) },
  { weight: 4, arbitrary: fc.constant(null).map(() => ({ key: `fuzz-${idempotencyCounter++}`, hostile: false })) },
  { weight: 1, arbitrary: fc.constantFrom('reused-1', 'reused-2').map((key) => ({ key, hostile: true })) },
  {
    weight: 1,
    arbitrary: fc
      .constantFrom('', ' ', 'é', 'x'.repeat(201), 'a b', '\t', "'; drop table idempotency_keys; --")
      .map((key) => ({ key, hostile: true })),
  },
);

/** Odd extras: a lying Content-Length, an encoding that was not applied, a hostile request id, a hostile Accept. */
const extraHeadersArb: fc.Arbitrary<Record<string, string>> = fc.oneof(
  { weight: 20, arbitrary: fc.constant({}) },
  { weight: 1, arbitrary: fc.constantFrom('0', '-1', 'abc', '99999999', '1').map((v) => ({ 'content-length': v })) },
  {
    weight: 1,
    arbitrary: fc
      .constantFrom('gzip', 'deflate', 'br', 'identity', 'x-unknown')
      .map((v) => ({ 'content-encoding': v })),
  },
  {
    weight: 1,
    arbitrary: fc.constantFrom('../x', 'a'.repeat(65), 'ok-id.1', '%00', '💥').map((v) => ({ 'x-request-id': v })),
  },
  {
    weight: 1,
    arbitrary: fc
      .constantFrom('application/xml', 'text/csv', '*/*;q=0', 'image/svg+xml', '')
      .map((v) => ({ accept: v })),
  },
);

// ---------------------------------------------------------------- requests

export function requestArb(route: FuzzRoute, ctx: RequestContext): fc.Arbitrary<FuzzRequest> {
  const writes = route.method !== 'GET';
  return fc
    .record({
      path: pathArb(route, ctx),
      query: queryArb(route, ctx),
      body: bodyArb(route, ctx),
      auth: authArb(route, ctx),
      idempotency: writes ? idempotencyArb : fc.constant<{ key?: string; hostile: boolean }>({ hostile: false }),
      extra: extraHeadersArb,
    })
    .map(({ path, query, body, auth, idempotency, extra }) => {
      const headers: Record<string, string> = { ...extra };
      if (auth.authorization !== undefined) headers.authorization = auth.authorization;
      if (body.contentType !== undefined) headers['content-type'] = body.contentType;
      if (idempotency.key !== undefined) headers['idempotency-key'] = idempotency.key;
      const hostileParts = [
        path.hostile ? 'path' : null,
        query.hostile ? 'query' : null,
        auth.kind,
        idempotency.hostile ? 'idempotency-key' : null,
        Object.keys(extra).length > 0 ? `header:${Object.keys(extra)[0]}` : null,
      ].filter((p): p is string => p !== null);
      const kind = [body.kind, ...hostileParts].join('+');
      return {
        method: route.method,
        url: `${path.path}${query.query}`,
        headers,
        ...(body.payload !== undefined ? { payload: body.payload } : {}),
        kind,
      };
    });
}
