/**
 * Bearer API keys. Every route under /v1 declares the permission it needs in
 * its config; the key's role must grant it. Unknown, malformed and revoked
 * keys all get the same 401 (no hint which).
 */
import type { FastifyInstance } from 'fastify';
import type { Store } from '../../store/connect.js';
import { authenticate } from '../../store/api-keys.js';
import { allows } from '../principal.js';
import { Problem } from '../problem.js';

export function installAuth(app: FastifyInstance, store: Store): void {
  app.addHook('onRequest', async (request, reply) => {
    const permission = request.routeOptions.config?.permission;
    if (!permission) return;
    const header = request.headers.authorization;
    const token = typeof header === 'string' && header.startsWith('Bearer ') ? header.slice(7).trim() : null;
    const key = token ? await authenticate(store.db, token) : null;
    if (!key) {
      reply.header('www-authenticate', 'Bearer realm="mvledger"');
      throw new Problem('unauthorized', 'send Authorization: Bearer <API key> with a live key');
    }
    request.principal = { keyId: key.id, organisationId: key.organisation_id, role: key.role };
    if (!allows(key.role, permission)) {
      throw new Problem('forbidden', `the ${key.role} role does not have the "${permission}" permission this route needs`);
    }
  });
}
