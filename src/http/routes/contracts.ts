/** /v1/facilities/{id}/contract: the performance contract and its guarantees. */
import type { RouteDeps } from '../route-deps.js';
import { getContract, putContract } from '../../services/contracts.js';
import { authProblems, bearer, idParams, idempotencyHeaders, writeProblems } from '../schemas/common.js';
import { contractSchema, putContractBody } from '../schemas/contracts.js';
import { requestContext } from '../request-context.js';
import type { ApiApp } from './types.js';

export function contractsRoutes(app: ApiApp, deps: RouteDeps): void {
  app.put(
    '/v1/facilities/:id/contract',
    {
      config: { permission: 'ledger' },
      schema: {
        tags: ['contracts'],
        summary: 'Set the facility’s contract',
        description:
          'Contract start, number of contract years, and the guaranteed savings of each year (energy in energyUnit, cost in currency, or both). Contract year N covers [start + (N−1) years, start + N years).',
        security: bearer,
        headers: idempotencyHeaders,
        params: idParams,
        body: putContractBody,
        response: { 200: contractSchema, ...writeProblems },
      },
    },
    async (request) => putContract(requestContext(request, deps).service, request.params.id, request.body),
  );

  app.get(
    '/v1/facilities/:id/contract',
    {
      config: { permission: 'read' },
      schema: {
        tags: ['contracts'],
        summary: 'The facility’s contract',
        security: bearer,
        params: idParams,
        response: { 200: contractSchema, ...authProblems },
      },
    },
    async (request) => getContract(deps.store.db, requestContext(request, deps).organisationId, request.params.id),
  );
}
