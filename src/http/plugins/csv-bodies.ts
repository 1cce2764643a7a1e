/**
 * text/csv request bodies. A route that takes CSV names its collection in
 * config.csvBody; the CSV text is turned into the same JSON body the route's
 * zod schema validates (cells that look like numbers become numbers, the
 * rest stay text for the schema to reject), and each record's file line is
 * remembered so errors say "row 5, field end" instead of a JSON path.
 */
import fp from 'fastify-plugin';
import { parseCsvTable } from '../../lib/csv/csv-table.js';
import { parseFlagCell } from '../../lib/csv/cells.js';
import { InputFileError } from '../../lib/csv/input-error.js';
import { Problem } from '../problem.js';
import { FASTIFY_VERSION, PLUGIN } from './names.js';

export type CsvCollection = 'readings' | 'observations' | 'days' | 'values' | 'exceptions';

/** A CSV normal year carries its source in this header (the CSV itself holds only day,temp). */
export const NORMAL_YEAR_SOURCE_HEADER = 'x-normal-year-source';

declare module 'fastify' {
  interface FastifyContextConfig {
    /** The route also takes text/csv; its rows become body[collection]. */
    csvBody?: CsvCollection;
  }
  interface FastifyRequest {
    /** The body came as text/csv (a JSON body that is a string is not CSV). */
    sentAsCsv?: boolean;
  }
}

const COLUMNS: Record<CsvCollection, { required: string[][]; optional: string[]; flags: string[] }> = {
  readings: { required: [['start', 'end', 'quantity']], optional: ['estimated', 'cost'], flags: ['estimated'] },
  observations: {
    required: [
      ['date', 'temp'],
      ['date', 'tmin', 'tmax'],
    ],
    optional: [],
    flags: [],
  },
  days: { required: [['day', 'temp']], optional: [], flags: [] },
  values: {
    required: [
      ['date', 'value'],
      ['start', 'end', 'value'],
    ],
    optional: [],
    flags: [],
  },
  // A calendar's dated exceptions; its day types and weekly pattern come beside them (the route says how).
  // Header names are compared in lower case; `daytype` becomes the body's `dayType`.
  exceptions: { required: [['start', 'end', 'daytype']], optional: ['note'], flags: [] },
};

/** Columns whose body field is not the column's lower-case name. */
const BODY_FIELD: Readonly<Record<string, string>> = { daytype: 'dayType' };

/** Columns taken as text whatever they hold (dates, names). */
const TEXT_COLUMNS = new Set(['date', 'day', 'start', 'end', 'daytype', 'note']);

const DECIMAL = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;
const BODY = 'request body';

function cellValue(text: string, flag: boolean): unknown {
  if (flag) {
    const parsed = parseFlagCell(text);
    return parsed.ok ? parsed.value : text;
  }
  return DECIMAL.test(text) ? Number(text) : text;
}

/** CSV text → { [collection]: records }, with each record's line. */
export function csvToBody(collection: CsvCollection, text: string): { body: Record<string, unknown>; lines: number[] } {
  const spec = COLUMNS[collection];
  let table;
  try {
    table = parseCsvTable(BODY, text);
  } catch (error) {
    if (error instanceof InputFileError) throw csvProblem(error);
    throw error;
  }
  const present = new Set(table.columns.filter((c) => c !== ''));
  const layout = spec.required.find((set) => set.every((c) => present.has(c)));
  if (!layout) {
    const wanted = spec.required.map((set) => set.join(',')).join(' or ');
    throw new Problem('validation', `row ${table.headerLine}: the CSV header must have ${wanted}`, [
      { field: `row ${table.headerLine}`, message: `header needs ${wanted}` },
    ]);
  }
  const allowed = new Set([...spec.required.flat(), ...spec.optional]);
  const unknown = [...present].filter((c) => !allowed.has(c));
  if (unknown.length > 0) {
    throw new Problem(
      'validation',
      `row ${table.headerLine}: unknown column ${unknown.map((c) => `"${c}"`).join(', ')}`,
      [{ field: `row ${table.headerLine}`, message: `unknown column ${unknown.join(', ')}` }],
    );
  }
  const records = table.rows.map((row) => {
    const record: Record<string, unknown> = {};
    for (const [column, text] of row.cells) {
      if (text === '' || !allowed.has(column)) continue;
      record[BODY_FIELD[column] ?? column] = TEXT_COLUMNS.has(column)
        ? text
        : cellValue(text, spec.flags.includes(column));
    }
    return record;
  });
  return { body: { [collection]: records }, lines: table.rows.map((row) => row.line) };
}

function csvProblem(error: InputFileError): Problem {
  const where = error.line === null ? 'CSV body' : `row ${error.line}${error.field ? `, field ${error.field}` : ''}`;
  return new Problem('validation', `${where}: ${error.detail}`, [{ field: where, message: error.detail }]);
}

/** The text/csv parser, and the hook that turns a CSV body into the route's JSON before validation. */
export const csvBodiesPlugin = fp(
  async (app) => {
    app.addContentTypeParser(['text/csv', 'application/csv'], { parseAs: 'string' }, (request, body, done) => {
      request.sentAsCsv = true;
      done(null, body);
    });
    app.addHook('preValidation', async (request) => {
      const collection = request.routeOptions.config?.csvBody;
      if (!collection || !request.sentAsCsv || typeof request.body !== 'string') return;
      const { body, lines } = csvToBody(collection, request.body);
      const source = request.headers[NORMAL_YEAR_SOURCE_HEADER];
      if (collection === 'days' && typeof source === 'string') body.source = source;
      request.body = body;
      request.csvLines = { collection, lines };
    });
  },
  // Its refusals are problems naming the CSV row.
  { name: PLUGIN.csvBodies, fastify: FASTIFY_VERSION, dependencies: [PLUGIN.problems] },
);
