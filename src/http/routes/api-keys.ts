/**
 * /v1/api-keys: an organisation's admins make, list and revoke its keys. The
 * token is in the create response only; Idempotency-Key is refused on
 * create, because a replay store would have to keep the token.
 */
import type { FastifyRequest } from 'fastify';
import { z } from 'zod';
import type { RouteDeps } from '../route-deps.js';
import { createApiKey, listApiKeys, revokeApiKey } from '../../services/api-keys.js';
import { IDEMPOTENCY_HEADER } from '../plugins/idempotency.js';
import { Problem } from '../problem.js';
import {
  authProblems,
  bearer,
  idParams,
  idempotencyHeaders,
  problemSchema,
  writeProblems,
  pageFields,
  pageQuery,
} from '../schemas/common.js';
import { apiKeySchema, createApiKeyBody, createdApiKeySchema } from '../schemas/api-keys.js';
import { requestContext } from '../request-context.js';
import { PAGE_SIZES } from '../../services/paging.js';
import type { ApiApp } from './types.js';

/** A preValidation hook: it runs before the idempotency plugin's preHandler, so no replay row is ever written. */
async function refuseIdempotencyKey(request: FastifyRequest): Promise<void> {
  if (request.headers[IDEMPOTENCY_HEADER] !== undefined) {
    throw new Problem(
      'validation',
      'Idempotency-Key is not accepted on API-key routes: the response holds a secret that is never stored',
      [{ field: 'header.idempotency-key', message: 'not accepted here' }],
    );
  }
}

export function apiKeysRoutes(app: ApiApp, deps: RouteDeps): void {
  app.post(
    '/v1/api-keys',
    {
      config: { permission: 'keys' },
      preValidation: refuseIdempotencyKey,
      schema: {
        tags: ['api-keys'],
        summary: 'Create an API key',
        description:
          'The response holds the token, shown this once: it is not stored and cannot be shown again. Idempotency-Key is not accepted.',
        security: bearer,
        body: createApiKeyBody,
        response: { 201: createdApiKeySchema, ...writeProblems },
      },
    },
    async (request, reply) =>
      reply.code(201).send(await createApiKey(requestContext(request, deps).service, request.body)),
  );

  app.get(
    '/v1/api-keys',
    {
      config: { permission: 'keys' },
      schema: {
        tags: ['api-keys'],
        summary: "List the organisation's API keys",
        description: `Oldest first, in pages (default ${PAGE_SIZES.records.default}, at most ${PAGE_SIZES.records.max}): follow nextCursor.`,
        security: bearer,
        querystring: z.object(pageQuery(PAGE_SIZES.records, 'Keys')),
        response: { 200: z.object({ keys: z.array(apiKeySchema), ...pageFields }), ...authProblems },
      },
    },
    async (request) => listApiKeys(deps.store.db, requestContext(request, deps).organisationId, request.query),
  );

  app.delete(
    '/v1/api-keys/:id',
    {
      config: { permission: 'keys' },
      schema: {
        tags: ['api-keys'],
        summary: 'Revoke an API key',
        description:
          'The key answers 401 from then on. The key making the request cannot revoke itself (409). Revoking a revoked key changes nothing.',
        security: bearer,
        params: idParams,
        headers: idempotencyHeaders,
        response: { 200: apiKeySchema, ...authProblems, 409: problemSchema },
      },
    },
    async (request) => revokeApiKey(requestContext(request, deps).service, request.params.id),
  );
}
