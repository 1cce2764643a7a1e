/** /v1/me: the calling key's own name, role and permissions, so a client can show only what the key may do. */
import { z } from 'zod';
import type { RouteDeps } from '../app.js';
import { describeCaller } from '../../services/api-keys.js';
import { ROLE_PERMISSIONS } from '../../domain/principal.js';
import { authProblems, bearer } from '../schemas/common.js';
import type { ApiApp } from './types.js';

const callerSchema = z
  .object({
    key: z.object({ id: z.string(), name: z.string(), role: z.enum(['admin', 'engineer', 'analyst', 'integration']) }),
    permissions: z.array(z.string()).describe('What the role may do: read, savings, data, ledger, keys, self'),
    organisation: z.object({ id: z.string(), name: z.string() }),
  })
  .meta({ id: 'Caller', description: 'The calling API key (never its secret), its permissions and its organisation' });

export function meRoutes(app: ApiApp, deps: RouteDeps): void {
  app.get(
    '/v1/me',
    {
      config: { permission: 'self' },
      schema: {
        tags: ['api-keys'],
        summary: 'The calling key: its name, role and permissions',
        security: bearer,
        response: { 200: callerSchema, ...authProblems },
      },
    },
    async (request) => {
      const principal = request.principal!;
      return describeCaller(deps.store.db, principal, ROLE_PERMISSIONS[principal.role]);
    },
  );
}
