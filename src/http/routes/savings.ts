/** Savings: avoided energy of a meter against its active frozen baseline. */
import { z } from 'zod';
import type { RouteDeps } from '../route-deps.js';
import { requestContext } from '../request-context.js';
import { noneMatchHits } from '../../services/savings-cache.js';
import type { MeterSavings } from '../../services/savings.js';
import { authProblems, bearer, idParams, problemSchema } from '../schemas/common.js';
import { savingsQuery, savingsSchema } from '../schemas/savings.js';
import type { ApiApp } from './types.js';

export function savingsRoutes(app: ApiApp, deps: RouteDeps): void {
  // The body is rendered exactly as the route's serialiser would (validated, then JSON).
  const render = (document: MeterSavings) => JSON.stringify(z.encode(savingsSchema, document));
  app.get(
    '/v1/meters/:id/savings',
    {
      config: { permission: 'savings' },
      schema: {
        tags: ['savings'],
        summary: 'Avoided energy against the frozen baseline',
        description:
          'Projects the frozen baseline’s chosen model (as stored, never refitted) onto the weather of the reporting readings (those starting on or after the baseline’s end, optionally within from..to), adds the meter’s non-routine adjustments to the adjusted baseline of the periods they cover, and states the uncertainty at the chosen confidence (the model’s two, the adjustments’ own and the combined ±). The projection keeps the baseline’s temperature form. 422 when there is no frozen baseline or no usable reporting reading, and when more of the reporting days than the extrapolation limit (10%) have weather outside what the baseline saw, unless the baseline was frozen with overrides.extrapolation (the document then states the override).\n\nComputed once per data version of the meter: every write that can change the figures (a reading or correction, the station’s weather, an adjustment or its withdrawal, rates, freezing or superseding a baseline) gives the meter a new version in the same transaction, and the document is then computed afresh. The response carries a strong `ETag`; send it back in `If-None-Match` and the answer is 304 with no body while the figures stand.',
        security: bearer,
        params: idParams,
        querystring: savingsQuery,
        headers: z.object({
          'if-none-match': z
            .string()
            .optional()
            .describe('An ETag of an earlier answer: 304 while the figures have not changed'),
        }),
        response: {
          200: savingsSchema,
          304: z.null().describe('Not modified: the figures behind the ETag sent in If-None-Match still stand'),
          ...authProblems,
          422: problemSchema,
        },
      },
    },
    async (request, reply) => {
      const { body, etag } = await deps.savingsCache.savings(
        deps.store.db,
        requestContext(request, deps).organisationId,
        request.params.id,
        request.query,
        render,
      );
      // private: the answer depends on the caller's key; no-cache: a client revalidates before reusing it.
      reply.header('etag', etag).header('cache-control', 'private, no-cache');
      if (noneMatchHits(request.headers['if-none-match'], etag)) return reply.code(304).send(undefined as never); // no body
      // A string with a JSON content type goes out as it is (already rendered by the route's serialiser above).
      return reply.type('application/json; charset=utf-8').send(body as never);
    },
  );
}
