/** /v1/weather-stations/{id}/observations: daily temperatures, upserted by date (JSON or CSV). */
import type { RouteDeps } from '../app.js';
import { listObservations, putObservations } from '../../services/observations.js';
import { authProblems, bearer, idParams, idempotencyHeaders, writeProblems } from '../schemas/common.js';
import { observationsList, putObservationsBody, putObservationsResult } from '../schemas/observations.js';
import { dateRangeQuery } from '../schemas/readings.js';
import { serviceContext } from './context.js';
import { recordLocator } from './readings.js';
import type { ApiApp } from './types.js';

export function observationsRoutes(app: ApiApp, deps: RouteDeps): void {
  app.put(
    '/v1/weather-stations/:id/observations',
    {
      config: { permission: 'data', csvBody: 'observations' },
      schema: {
        tags: ['weather'],
        summary: 'Upsert daily observations',
        description:
          "All or nothing, by date. Temperatures are in the station's unit and must be plausible. A day inside the window of a frozen baseline of a meter on this station cannot change (409).",
        security: bearer,
        params: idParams,
        headers: idempotencyHeaders,
        body: putObservationsBody,
        response: { 200: putObservationsResult, ...writeProblems },
      },
    },
    async (request) =>
      putObservations(serviceContext(request, deps), request.params.id, request.body, recordLocator(request, 'observations')),
  );

  app.get(
    '/v1/weather-stations/:id/observations',
    {
      config: { permission: 'read' },
      schema: {
        tags: ['weather'],
        summary: "A station's observations",
        description: 'Days in [from, to), by date.',
        security: bearer,
        params: idParams,
        querystring: dateRangeQuery,
        response: { 200: observationsList, ...authProblems },
      },
    },
    async (request) => listObservations(deps.store.db, request.principal!.organisationId, request.params.id, request.query),
  );
}
