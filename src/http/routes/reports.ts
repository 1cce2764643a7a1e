/** /v1/reports/savings: the savings report as JSON, CSV or a printable HTML document. */
import { z } from 'zod';
import type { RouteDeps } from '../route-deps.js';
import { requestContext } from '../request-context.js';
import { savingsReport } from '../../services/reports.js';
import { renderReportCsv } from '../../reports/csv.js';
import { renderReportHtml } from '../../reports/html/render-report.js';
import { authProblems, bearer, problemSchema } from '../schemas/common.js';
import { reportJsonSchema, reportQuery } from '../schemas/reports.js';
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
      const report = await savingsReport(deps.store.db, requestContext(request, deps).organisationId, query);
      const body =
        format === 'csv' ? renderReportCsv(report) : format === 'html' ? renderReportHtml(report) : `${JSON.stringify(report, null, 2)}\n`;
      return reply.type(CONTENT_TYPES[format]).header('x-report-content-hash', report.contentHash).send(body);
    },
  );
}
