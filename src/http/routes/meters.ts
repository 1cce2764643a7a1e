/** Meters of a facility (/v1/facilities/{id}/meters) and each meter by id (/v1/meters/{id}). */
import { z } from 'zod';
import type { RouteDeps } from '../route-deps.js';
import { createMeter, getMeterRow, listMeters, listOrganisationMeters, toMeter } from '../../services/meters.js';
import {
  authProblems,
  bearer,
  idParams,
  idempotencyHeaders,
  writeProblems,
  pageFields,
  pageQuery,
} from '../schemas/common.js';
import { createMeterBody, listMetersQuery, meterSchema } from '../schemas/meters.js';
import { requestContext } from '../request-context.js';
import { PAGE_SIZES } from '../../services/paging.js';
import type { ApiApp } from './types.js';

export function metersRoutes(app: ApiApp, deps: RouteDeps): void {
  app.post(
    '/v1/facilities/:id/meters',
    {
      config: { permission: 'ledger' },
      schema: {
        tags: ['meters'],
        summary: 'Add a meter to a facility',
        security: bearer,
        params: idParams,
        headers: idempotencyHeaders,
        body: createMeterBody,
        response: { 201: meterSchema, ...writeProblems },
      },
    },
    async (request, reply) =>
      reply.code(201).send(await createMeter(requestContext(request, deps).service, request.params.id, request.body)),
  );

  app.get(
    '/v1/facilities/:id/meters',
    {
      config: { permission: 'read' },
      schema: {
        tags: ['meters'],
        summary: "List a facility's meters",
        description: `Oldest first, in pages (default ${PAGE_SIZES.records.default}, at most ${PAGE_SIZES.records.max}): follow nextCursor.`,
        security: bearer,
        params: idParams,
        querystring: z.object(pageQuery(PAGE_SIZES.records, 'Meters')),
        response: { 200: z.object({ meters: z.array(meterSchema), ...pageFields }), ...authProblems },
      },
    },
    async (request) =>
      listMeters(deps.store.db, requestContext(request, deps).organisationId, request.params.id, request.query),
  );

  app.get(
    '/v1/meters',
    {
      config: { permission: 'reconcile' },
      schema: {
        tags: ['meters'],
        summary: "List the organisation's meters",
        description: `Every meter of every facility (optionally one facility), oldest first, in pages (default ${PAGE_SIZES.records.default}, at most ${PAGE_SIZES.records.max}): what a billing system needs to map its accounts to meter ids. Open to every role, the integration role included.`,
        security: bearer,
        querystring: listMetersQuery.extend(pageQuery(PAGE_SIZES.records, 'Meters')),
        response: {
          200: z.object({ meters: z.array(meterSchema), ...pageFields }).meta({ id: 'MeterList' }),
          ...authProblems,
        },
      },
    },
    async (request) =>
      listOrganisationMeters(deps.store.db, requestContext(request, deps).organisationId, request.query),
  );

  app.get(
    '/v1/meters/:id',
    {
      config: { permission: 'reconcile' },
      schema: {
        tags: ['meters'],
        summary: 'One meter',
        security: bearer,
        params: idParams,
        response: { 200: meterSchema, ...authProblems },
      },
    },
    async (request) =>
      toMeter(await getMeterRow(deps.store.db, requestContext(request, deps).organisationId, request.params.id)),
  );
}
