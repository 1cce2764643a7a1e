/** /v1/meters/{id}/adjustments: non-routine adjustments of a meter's reporting period. */
import { z } from 'zod';
import type { RouteDeps } from '../route-deps.js';
import { createAdjustment, listAdjustments, withdrawAdjustment } from '../../services/adjustments.js';
import { authProblems, bearer, idParams, idempotencyHeaders, writeProblems, pageQuery } from '../schemas/common.js';
import {
  adjustmentList,
  adjustmentSchema,
  createAdjustmentBody,
  withdrawAdjustmentBody,
} from '../schemas/adjustments.js';
import { requestContext } from '../request-context.js';
import { PAGE_SIZES } from '../../services/paging.js';
import type { ApiApp } from './types.js';

export function adjustmentsRoutes(app: ApiApp, deps: RouteDeps): void {
  app.post(
    '/v1/meters/:id/adjustments',
    {
      config: { permission: 'ledger' },
      schema: {
        tags: ['adjustments'],
        summary: 'Record a non-routine adjustment',
        description:
          'A documented change the weather model cannot see, over reporting days [start, end), as a total (quantity) or per day, in the meter’s unit, optionally with the engineer’s standard uncertainty of its total; it enters the adjusted baseline of the periods it covers (its ± the combined ± of the savings) and every report lists it. 422 before a baseline is frozen or inside its window; 409 when it overlaps another adjustment of the meter.',
        security: bearer,
        headers: idempotencyHeaders,
        params: idParams,
        body: createAdjustmentBody,
        response: { 201: adjustmentSchema, ...writeProblems },
      },
    },
    async (request, reply) =>
      reply
        .code(201)
        .send(await createAdjustment(requestContext(request, deps).service, request.params.id, request.body)),
  );

  app.post(
    '/v1/adjustments/:id/withdraw',
    {
      config: { permission: 'ledger' },
      schema: {
        tags: ['adjustments'],
        summary: 'Withdraw an adjustment recorded in error',
        description:
          'With a reason. It stops counting in savings and reports but stays on record, with who withdrew it and why. 409 when already withdrawn.',
        security: bearer,
        headers: idempotencyHeaders,
        params: idParams,
        body: withdrawAdjustmentBody,
        response: { 200: adjustmentSchema, ...writeProblems },
      },
    },
    async (request) => withdrawAdjustment(requestContext(request, deps).service, request.params.id, request.body),
  );

  app.get(
    '/v1/meters/:id/adjustments',
    {
      config: { permission: 'read' },
      schema: {
        tags: ['adjustments'],
        summary: 'A meter’s non-routine adjustments',
        description: `By start (withdrawn ones too), in pages (default ${PAGE_SIZES.records.default}, at most ${PAGE_SIZES.records.max}): follow nextCursor.`,
        security: bearer,
        params: idParams,
        querystring: z.object(pageQuery(PAGE_SIZES.records, 'Adjustments')),
        response: { 200: adjustmentList, ...authProblems },
      },
    },
    async (request) =>
      listAdjustments(deps.store.db, requestContext(request, deps).organisationId, request.params.id, request.query),
  );
}
