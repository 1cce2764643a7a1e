/** The caller's identity on a request: set by the auth plugin, required by each route's permission. */
import type {} from 'fastify';
import type { Permission, Principal } from '../domain/principal.js';

declare module 'fastify' {
  interface FastifyRequest {
    principal?: Principal;
  }
  interface FastifyContextConfig {
    /** The permission a route requires; routes without one are public. */
    permission?: Permission;
  }
}
