/** /v1/meters/{id}/rates: the meter's contract rate schedule. */
import type { RouteDeps } from '../route-deps.js';
import { getRates, putRates } from '../../services/rates.js';
import { authProblems, bearer, idParams, idempotencyHeaders, writeProblems } from '../schemas/common.js';
import { putRatesBody, rateScheduleSchema } from '../schemas/rates.js';
import { requestContext } from '../request-context.js';
import type { ApiApp } from './types.js';

export function ratesRoutes(app: ApiApp, deps: RouteDeps): void {
  app.put(
    '/v1/meters/:id/rates',
    {
      config: { permission: 'ledger' },
      schema: {
        tags: ['costs'],
        summary: 'Replace the contract rate schedule',
        description:
          'Effective-dated rates (currency per unit of the meter) with an optional yearly escalation. Gaps, overlaps and entries out of order are refused (400) naming the entries. Cost avoided = avoided energy × the rate of each period; days without a rate are flagged in reports, never assumed.',
        security: bearer,
        headers: idempotencyHeaders,
        params: idParams,
        body: putRatesBody,
        response: { 200: rateScheduleSchema, ...writeProblems },
      },
    },
    async (request) => putRates(requestContext(request, deps).service, request.params.id, request.body),
  );

  app.get(
    '/v1/meters/:id/rates',
    {
      config: { permission: 'read' },
      schema: {
        tags: ['costs'],
        summary: 'The contract rate schedule',
        security: bearer,
        params: idParams,
        response: { 200: rateScheduleSchema, ...authProblems },
      },
    },
    async (request) => getRates(deps.store.db, requestContext(request, deps).organisationId, request.params.id),
  );
}
