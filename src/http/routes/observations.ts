/** /v1/weather-stations/{id}/observations: daily temperatures, upserted by date (JSON or CSV). */
import type { RouteDeps } from '../route-deps.js';
import { listObservations, putObservations } from '../../services/observations.js';
import { authProblems, bearer, idParams, idempotencyHeaders, writeProblems } from '../schemas/common.js';
import { observationsList, putObservationsBody, putObservationsResult } from '../schemas/observations.js';
import { seriesQuery } from '../schemas/readings.js';
import { PAGE_SIZES } from '../../services/paging.js';
import { requestContext } from '../request-context.js';
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
      putObservations(
        requestContext(request, deps).service,
        request.params.id,
        request.body,
        recordLocator(request, 'observations'),
      ),
  );

  app.get(
    '/v1/weather-stations/:id/observations',
    {
      config: { permission: 'read' },
      schema: {
        tags: ['weather'],
        summary: "A station's observations",
        description: `Days in [from, to), by date, in pages (default ${PAGE_SIZES.series.default}, at most ${PAGE_SIZES.series.max}): follow nextCursor until it is null.`,
        security: bearer,
        params: idParams,
        querystring: seriesQuery('Observations'),
        response: { 200: observationsList, ...authProblems },
      },
    },
    async (request) =>
      listObservations(deps.store.db, requestContext(request, deps).organisationId, request.params.id, request.query),
  );
}
