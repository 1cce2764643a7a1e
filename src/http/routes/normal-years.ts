/** /v1/weather-stations/{id}/normal-year: the station's normal year for normalised savings (JSON or CSV). */
import type { RouteDeps } from '../route-deps.js';
import {
  getNormalYear,
  normalYearFromPublishedNormals,
  normalYearFromStationHistory,
  putNormalYear,
} from '../../services/normal-years.js';
import { authProblems, bearer, idParams, idempotencyHeaders, writeProblems } from '../schemas/common.js';
import {
  normalYearFromHistoryBody,
  normalYearSchema,
  publishedNormalsBody,
  publishedNormalsQuery,
  putNormalYearBody,
} from '../schemas/normal-years.js';
import { requestContext } from '../request-context.js';
import { recordLocator } from './readings.js';
import type { ApiApp } from './types.js';

export function normalYearsRoutes(app: ApiApp, deps: RouteDeps): void {
  app.put(
    '/v1/weather-stations/:id/normal-year',
    {
      config: { permission: 'ledger', csvBody: 'days' },
      schema: {
        tags: ['weather'],
        summary: 'Replace the station’s normal year',
        description:
          'The 365 daily mean temperatures (MM-DD, 02-29 left out) of a long-term typical year, in the station’s unit, with their source. Normalised savings apply the frozen baseline and a reporting-period model to it.',
        security: bearer,
        params: idParams,
        headers: idempotencyHeaders,
        body: putNormalYearBody,
        response: { 200: normalYearSchema, ...writeProblems },
      },
    },
    async (request) =>
      putNormalYear(
        requestContext(request, deps).service,
        request.params.id,
        request.body,
        recordLocator(request, 'days'),
      ),
  );

  app.post(
    '/v1/weather-stations/:id/normal-year/from-history',
    {
      config: { permission: 'ledger' },
      schema: {
        tags: ['weather'],
        summary: 'Build the station’s normal year from its own record',
        description:
          'The mean of each calendar day over fromYear..toYear (29 February folded into 28 February), smoothed by a centred moving mean of windowDays (default 15), stored as the station’s normal year with a source that says so. Every calendar day needs at least 80% of the years on record (422 naming the days short of it).',
        security: bearer,
        params: idParams,
        headers: idempotencyHeaders,
        body: normalYearFromHistoryBody,
        response: { 200: normalYearSchema, ...writeProblems },
      },
    },
    async (request) =>
      normalYearFromStationHistory(requestContext(request, deps).service, request.params.id, request.body),
  );

  app.post(
    '/v1/weather-stations/:id/normal-year/from-published-normals',
    {
      config: { permission: 'ledger' },
      schema: {
        tags: ['weather'],
        summary: 'Store the station’s normal year from published daily normals',
        description:
          'The published daily normals file as the body (NOAA daily normals CSV), read in the named format: each day’s DLY-TAVG-NORMAL, else (DLY-TMAX-NORMAL + DLY-TMIN-NORMAL)/2; −9999, an empty cell or an unusable measurement flag is missing; 02-29 left out. Converted once to the station’s unit and stored as the station’s normal year with a source that says so, all or nothing, on the audit trail. A fault in the file is a 400 naming its line and column.',
        security: bearer,
        params: idParams,
        querystring: publishedNormalsQuery,
        headers: idempotencyHeaders,
        consumes: ['text/plain', 'text/csv'],
        body: publishedNormalsBody,
        response: { 200: normalYearSchema, ...writeProblems },
      },
    },
    async (request) =>
      normalYearFromPublishedNormals(requestContext(request, deps).service, request.params.id, {
        format: request.query.format,
        text: request.body,
        ...(request.query.station !== undefined ? { archiveStationId: request.query.station } : {}),
        ...(request.query.fileUnit !== undefined ? { fileUnit: request.query.fileUnit } : {}),
      }),
  );

  app.get(
    '/v1/weather-stations/:id/normal-year',
    {
      config: { permission: 'read' },
      schema: {
        tags: ['weather'],
        summary: 'The station’s normal year',
        security: bearer,
        params: idParams,
        response: { 200: normalYearSchema, ...authProblems },
      },
    },
    async (request) => getNormalYear(deps.store.db, requestContext(request, deps).organisationId, request.params.id),
  );
}
