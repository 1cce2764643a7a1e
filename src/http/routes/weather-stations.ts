/** /v1/weather-stations: where daily temperatures come from. */
import { z } from 'zod';
import type { RouteDeps } from '../route-deps.js';
import { createStation, getStationRow, listStations, toStation } from '../../services/weather-stations.js';
import {
  authProblems,
  bearer,
  idParams,
  idempotencyHeaders,
  writeProblems,
  pageFields,
  pageQuery,
} from '../schemas/common.js';
import { createStationBody, stationRecordSchema, stationSchema } from '../schemas/weather-stations.js';
import { dateRangeQuery } from '../schemas/readings.js';
import { stationRecordSummary } from '../../services/station-records.js';
import { requestContext } from '../request-context.js';
import { PAGE_SIZES } from '../../services/paging.js';
import type { ApiApp } from './types.js';

export function weatherStationRoutes(app: ApiApp, deps: RouteDeps): void {
  app.post(
    '/v1/weather-stations',
    {
      config: { permission: 'ledger' },
      schema: {
        tags: ['weather'],
        summary: 'Create a weather station',
        security: bearer,
        headers: idempotencyHeaders,
        body: createStationBody,
        response: { 201: stationSchema, ...writeProblems },
      },
    },
    async (request, reply) =>
      reply.code(201).send(await createStation(requestContext(request, deps).service, request.body)),
  );

  app.get(
    '/v1/weather-stations',
    {
      config: { permission: 'read' },
      schema: {
        tags: ['weather'],
        summary: 'List weather stations',
        description: `Oldest first, in pages (default ${PAGE_SIZES.records.default}, at most ${PAGE_SIZES.records.max}): follow nextCursor.`,
        security: bearer,
        querystring: z.object(pageQuery(PAGE_SIZES.records, 'Stations')),
        response: { 200: z.object({ stations: z.array(stationSchema), ...pageFields }), ...authProblems },
      },
    },
    async (request) => listStations(deps.store.db, requestContext(request, deps).organisationId, request.query),
  );

  app.get(
    '/v1/weather-stations/:id',
    {
      config: { permission: 'read' },
      schema: {
        tags: ['weather'],
        summary: 'One weather station',
        security: bearer,
        params: idParams,
        response: { 200: stationSchema, ...authProblems },
      },
    },
    async (request) =>
      toStation(await getStationRow(deps.store.db, requestContext(request, deps).organisationId, request.params.id)),
  );

  app.get(
    '/v1/weather-stations/:id/record',
    {
      config: { permission: 'read' },
      schema: {
        tags: ['weather'],
        summary: 'The station’s record at a glance',
        description:
          'Over [from, to) (default: all of it): the span, days observed, filled (by method) and missing, per calendar year, the extremes and days outside plausible bounds, so the engineer sees whether it is fit for a baseline.',
        security: bearer,
        params: idParams,
        querystring: dateRangeQuery,
        response: { 200: stationRecordSchema, ...authProblems },
      },
    },
    async (request) =>
      stationRecordSummary(
        deps.store.db,
        requestContext(request, deps).organisationId,
        request.params.id,
        request.query,
      ),
  );
}
