/** /v1/facilities/{id}/variables and /v1/variables/{id}/values: independent variables and their values (JSON or CSV). */
import { z } from 'zod';
import type { RouteDeps } from '../route-deps.js';
import { createVariable, listVariableValues, listVariables, postVariableValues } from '../../services/variables.js';
import { authProblems, bearer, idParams, idempotencyHeaders, pageQuery, writeProblems } from '../schemas/common.js';
import { seriesQuery } from '../schemas/readings.js';
import {
  createVariableBody,
  postVariableValuesBody,
  postVariableValuesQuery,
  postVariableValuesResult,
  variableListSchema,
  variableSchema,
  variableValuesList,
} from '../schemas/variables.js';
import { requestContext } from '../request-context.js';
import { PAGE_SIZES } from '../../services/paging.js';
import { recordLocator } from './readings.js';
import type { ApiApp } from './types.js';

export function variablesRoutes(app: ApiApp, deps: RouteDeps): void {
  app.post(
    '/v1/facilities/:id/variables',
    {
      config: { permission: 'ledger' },
      schema: {
        tags: ['variables'],
        summary: 'Define an independent variable',
        description:
          'A named series (occupancy, people, production) of the facility, or of one of its meters (meterId), that a baseline fit may carry beside the weather (options.variables names it). A name already used there is refused (409).',
        security: bearer,
        params: idParams,
        headers: idempotencyHeaders,
        body: createVariableBody,
        response: { 201: variableSchema, ...writeProblems },
      },
    },
    async (request, reply) =>
      reply
        .code(201)
        .send(await createVariable(requestContext(request, deps).service, request.params.id, request.body)),
  );

  app.get(
    '/v1/facilities/:id/variables',
    {
      config: { permission: 'read' },
      schema: {
        tags: ['variables'],
        summary: "A facility's variables",
        description: `Facility-wide and meters' own, oldest first, in pages (default ${PAGE_SIZES.records.default}, at most ${PAGE_SIZES.records.max}): follow nextCursor.`,
        security: bearer,
        params: idParams,
        querystring: z.object(pageQuery(PAGE_SIZES.records, 'Variables')),
        response: { 200: variableListSchema, ...authProblems },
      },
    },
    async (request) =>
      listVariables(deps.store.db, requestContext(request, deps).organisationId, request.params.id, request.query),
  );

  app.post(
    '/v1/variables/:id/values',
    {
      config: { permission: 'data', csvBody: 'values' },
      schema: {
        tags: ['variables'],
        summary: "Post a batch of a variable's values",
        description:
          'All or nothing. A value identical to the stored one for the same period is counted unchanged; a different one is a correction and needs a correctionReason. A new period overlapping a stored one, or any change inside a frozen baseline window of a meter the variable serves, is refused (409).',
        security: bearer,
        params: idParams,
        headers: idempotencyHeaders,
        querystring: postVariableValuesQuery,
        body: postVariableValuesBody,
        response: { 200: postVariableValuesResult, 201: postVariableValuesResult, ...writeProblems },
      },
    },
    async (request, reply) => {
      const correctionReason = request.body.correctionReason ?? request.query.correctionReason;
      const unit = request.body.unit ?? request.query.unit;
      const result = await postVariableValues(
        requestContext(request, deps).service,
        request.params.id,
        {
          values: request.body.values,
          ...(correctionReason !== undefined ? { correctionReason } : {}),
          ...(unit !== undefined ? { unit } : {}),
        },
        recordLocator(request, 'values'),
      );
      return reply.code(result.created + result.corrected > 0 ? 201 : 200).send(result);
    },
  );

  app.get(
    '/v1/variables/:id/values',
    {
      config: { permission: 'reconcile' },
      schema: {
        tags: ['variables'],
        summary: "A variable's values",
        description: `Values whose period overlaps [from, to), by start, in pages (default ${PAGE_SIZES.series.default}, at most ${PAGE_SIZES.series.max}): follow nextCursor until it is null.`,
        security: bearer,
        params: idParams,
        querystring: seriesQuery('Values'),
        response: { 200: variableValuesList, ...authProblems },
      },
    },
    async (request) =>
      listVariableValues(deps.store.db, requestContext(request, deps).organisationId, request.params.id, request.query),
  );
}
