/** Savings: avoided energy of a meter against its active frozen baseline. */
import type { RouteDeps } from '../app.js';
import { meterSavings } from '../../services/savings.js';
import { authProblems, bearer, idParams, problemSchema } from '../schemas/common.js';
import { savingsQuery, savingsSchema } from '../schemas/savings.js';
import type { ApiApp } from './types.js';

export function savingsRoutes(app: ApiApp, deps: RouteDeps): void {
  app.get(
    '/v1/meters/:id/savings',
    {
      config: { permission: 'savings' },
      schema: {
        tags: ['savings'],
        summary: 'Avoided energy against the frozen baseline',
        description:
          'Projects the frozen baseline’s chosen model (as stored, never refitted) onto the weather of the reporting readings (those starting on or after the baseline’s end, optionally within from..to), adds the meter’s non-routine adjustments to the adjusted baseline of the periods they cover, and states the uncertainty at the chosen confidence (the model’s two, the adjustments’ own and the combined ±). The projection keeps the baseline’s temperature form. 422 when there is no frozen baseline or no usable reporting reading, and when more of the reporting days than the extrapolation limit (10%) have weather outside what the baseline saw, unless the baseline was frozen with overrides.extrapolation (the document then states the override).',
        security: bearer,
        params: idParams,
        querystring: savingsQuery,
        response: { 200: savingsSchema, ...authProblems, 422: problemSchema },
      },
    },
    async (request) => meterSavings(deps.store.db, request.principal!.organisationId, request.params.id, request.query),
  );
}
