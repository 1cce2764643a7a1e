/** /v1/facilities: the buildings or sites a contract covers. */
import { z } from 'zod';
import type { RouteDeps } from '../route-deps.js';
import { createFacility, getFacilityRow, listFacilities, toFacility } from '../../services/facilities.js';
import {
  authProblems,
  bearer,
  idParams,
  idempotencyHeaders,
  writeProblems,
  pageFields,
  pageQuery,
} from '../schemas/common.js';
import { createFacilityBody, facilitySchema } from '../schemas/facilities.js';
import { requestContext } from '../request-context.js';
import { PAGE_SIZES } from '../../services/paging.js';
import type { ApiApp } from './types.js';

export function facilitiesRoutes(app: ApiApp, deps: RouteDeps): void {
  app.post(
    '/v1/facilities',
    {
      config: { permission: 'ledger' },
      schema: {
        tags: ['facilities'],
        summary: 'Create a facility',
        security: bearer,
        headers: idempotencyHeaders,
        body: createFacilityBody,
        response: { 201: facilitySchema, ...writeProblems },
      },
    },
    async (request, reply) =>
      reply.code(201).send(await createFacility(requestContext(request, deps).service, request.body)),
  );

  app.get(
    '/v1/facilities',
    {
      config: { permission: 'read' },
      schema: {
        tags: ['facilities'],
        summary: 'List facilities',
        description: `Oldest first, in pages (default ${PAGE_SIZES.records.default}, at most ${PAGE_SIZES.records.max}): follow nextCursor.`,
        security: bearer,
        querystring: z.object(pageQuery(PAGE_SIZES.records, 'Facilities')),
        response: { 200: z.object({ facilities: z.array(facilitySchema), ...pageFields }), ...authProblems },
      },
    },
    async (request) => listFacilities(deps.store.db, requestContext(request, deps).organisationId, request.query),
  );

  app.get(
    '/v1/facilities/:id',
    {
      config: { permission: 'read' },
      schema: {
        tags: ['facilities'],
        summary: 'One facility',
        security: bearer,
        params: idParams,
        response: { 200: facilitySchema, ...authProblems },
      },
    },
    async (request) =>
      toFacility(await getFacilityRow(deps.store.db, requestContext(request, deps).organisationId, request.params.id)),
  );
}
