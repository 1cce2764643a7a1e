/** /v1/weather-stations/{id}/imports: a public station file, read and stored as the station's observations. */
import type { RouteDeps } from '../route-deps.js';
import { importStationFile } from '../../services/weather-imports.js';
import { bearer, idParams, idempotencyHeaders, writeProblems } from '../schemas/common.js';
import { importBody, importQuery, importResult } from '../schemas/weather-imports.js';
import { requestContext } from '../request-context.js';
import type { ApiApp } from './types.js';

export function weatherImportsRoutes(app: ApiApp, deps: RouteDeps): void {
  app.post(
    '/v1/weather-stations/:id/imports',
    {
      config: { permission: 'data' },
      schema: {
        tags: ['weather'],
        summary: 'Import a public station file',
        description:
          "The file as published (GHCN-Daily .dly or by-station CSV, GSOD CSV), read in the named format and converted once to the station's unit. Values with a failing quality flag are dropped and counted. All or nothing, on the audit trail with the import's counts; a fault in the file is a 400 naming its line and column. A day inside the window of a frozen baseline cannot change (409).",
        security: bearer,
        params: idParams,
        querystring: importQuery,
        headers: idempotencyHeaders,
        consumes: ['text/plain', 'text/csv'],
        body: importBody,
        response: { 200: importResult, ...writeProblems },
      },
    },
    async (request) =>
      importStationFile(requestContext(request, deps).service, request.params.id, {
        format: request.query.format,
        text: request.body,
        ...(request.query.station !== undefined ? { archiveStationId: request.query.station } : {}),
      }),
  );
}
