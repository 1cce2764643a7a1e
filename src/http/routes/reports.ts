/**
 * /v1/reports/savings: the savings report as JSON, CSV or a printable HTML
 * document, built whole; /v1/reports/savings/stream: the same figures for
 * any number of meters, written as they are computed (JSON or CSV). The
 * HTML is per facility above HTML_METER_LIMIT meters (services/reports.ts).
 */
import { once } from 'node:events';
import { PassThrough } from 'node:stream';
import { z } from 'zod';
import type { RouteDeps } from '../route-deps.js';
import { requestContext } from '../request-context.js';
import { checkHtmlReportSize, savingsReport } from '../../services/reports.js';
import { checkStreamedReport, streamSavingsReport } from '../../services/report-stream.js';
import { renderReportCsv } from '../../reports/csv.js';
import { renderReportHtml } from '../../reports/html/render-report.js';
import { authProblems, bearer, problemSchema } from '../schemas/common.js';
import { reportJsonSchema, reportQuery, streamedReportQuery } from '../schemas/reports.js';
import type { ApiApp } from './types.js';

const CONTENT_TYPES = {
  json: 'application/json; charset=utf-8',
  csv: 'text/csv; charset=utf-8',
  html: 'text/html; charset=utf-8',
} as const;

export function reportsRoutes(app: ApiApp, deps: RouteDeps): void {
  app.get(
    '/v1/reports/savings',
    {
      config: { permission: 'savings' },
      schema: {
        tags: ['reports'],
        summary: 'The savings report (JSON, CSV or HTML)',
        description:
          'Energy and cost avoided per meter, facility and organisation over a window (from and to, quarter=2026-Q3 or contractYear=N), converted to MMBtu and GJ, measured against the contract’s guarantees, with uncertainties, adjustments, normalised savings, the frozen baselines’ content hashes and the report’s own content hash. The same request on the same data returns the same bytes. 422 when no meter has reporting data in the window.',
        security: bearer,
        querystring: reportQuery,
        response: {
          200: {
            description: 'The report',
            content: {
              'application/json': { schema: reportJsonSchema },
              'text/csv': { schema: z.string().describe('One table; the record column names each row’s kind') },
              'text/html': { schema: z.string().describe('A printable document with charts') },
            },
          },
          ...authProblems,
          422: problemSchema,
        },
      },
    },
    async (request, reply) => {
      const { format = 'json', ...query } = request.query;
      const organisationId = requestContext(request, deps).organisationId;
      if (format === 'html') await checkHtmlReportSize(deps.store.db, organisationId, query);
      const report = await savingsReport(deps.store.db, organisationId, query);
      const body =
        format === 'csv'
          ? renderReportCsv(report)
          : format === 'html'
            ? renderReportHtml(report)
            : `${JSON.stringify(report, null, 2)}\n`;
      return reply.type(CONTENT_TYPES[format]).header('x-report-content-hash', report.contentHash).send(body);
    },
  );

  app.get(
    '/v1/reports/savings/stream',
    {
      config: { permission: 'savings' },
      schema: {
        tags: ['reports'],
        summary: 'The savings report of any number of meters, streamed (JSON or CSV)',
        description:
          'The figures of GET /v1/reports/savings for a whole organisation of any size, written facility by facility as they are computed, with memory bounded by a chunk of facilities. The same totals, facilities, meters, guarantees, notices and baselines; the differences: the JSON has "streamed": true, its keys in writing order (facilities before the portfolio), meters without chart points (signature null), and contentHash is the SHA-256 of the document’s bytes before the contentHash key; the CSV puts the portfolio rows after the facilities and ends with a digest row holding the SHA-256 of every byte before it. A response without its content hash at the end was cut short. 422 (before any byte) when no meter has reporting readings in the window.',
        security: bearer,
        querystring: streamedReportQuery,
        response: {
          200: {
            description: 'The report, streamed',
            content: {
              'application/json': { schema: z.string().describe('One JSON document, one facility per line') },
              'text/csv': { schema: z.string().describe('One table; the record column names each row’s kind') },
            },
          },
          ...authProblems,
          422: problemSchema,
        },
      },
    },
    async (request, reply) => {
      const { format = 'json', ...query } = request.query;
      const organisationId = requestContext(request, deps).organisationId;
      await checkStreamedReport(deps.store.db, organisationId, query);
      const body = new PassThrough();
      const write = async (text: string) => {
        if (body.destroyed) throw new Error('the client went away');
        if (!body.write(text)) await Promise.race([once(body, 'drain'), once(body, 'close')]);
        if (body.destroyed) throw new Error('the client went away');
      };
      streamSavingsReport(deps.store.db, organisationId, query, format, write).then(
        () => body.end(),
        (error: unknown) => {
          request.log.warn(
            { err: { message: error instanceof Error ? error.message : String(error) } },
            'streamed report stopped',
          );
          body.destroy();
        },
      );
      // The zod type provider types the 200 body as the documented string; a stream is what fastify sends as it is written.
      return reply.type(CONTENT_TYPES[format]).send(body as unknown as string);
    },
  );
}
