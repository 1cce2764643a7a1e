import type { FastifyRequest } from 'fastify';
import type { RouteDeps } from '../app.js';
import type { ServiceContext } from '../../services/context.js';

/** The service context of an authenticated request. */
export function serviceContext(request: FastifyRequest, deps: RouteDeps): ServiceContext {
  if (!request.principal) throw new Error('serviceContext on a route without a permission');
  return { store: deps.store, principal: request.principal, now: deps.now() };
}
