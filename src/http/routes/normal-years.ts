/** /v1/weather-stations/{id}/normal-year: the station's normal year for normalised savings (JSON or CSV). */
import type { RouteDeps } from '../app.js';
import { getNormalYear, putNormalYear } from '../../services/normal-years.js';
import { authProblems, bearer, idParams, idempotencyHeaders, writeProblems } from '../schemas/common.js';
import { normalYearSchema, putNormalYearBody } from '../schemas/normal-years.js';
import { serviceContext } from './context.js';
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
    async (request) => putNormalYear(serviceContext(request, deps), request.params.id, request.body, recordLocator(request, 'days')),
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
    async (request) => getNormalYear(deps.store.db, request.principal!.organisationId, request.params.id),
  );
}
