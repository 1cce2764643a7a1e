/** /v1/me: the calling key's own name, role and permissions, so a client (the /app workbench) shows only what the key may do. */
import type { RouteDeps } from '../route-deps.js';
import { describeCaller } from '../../services/api-keys.js';
import { authProblems, bearer } from '../schemas/common.js';
import { callerSchema } from '../schemas/api-keys.js';
import { requestContext } from '../request-context.js';
import type { ApiApp } from './types.js';

export function meRoutes(app: ApiApp, deps: RouteDeps): void {
  app.get(
    '/v1/me',
    {
      config: { permission: 'self' },
      schema: {
        tags: ['api-keys'],
        summary: 'The calling key: its name, role and permissions',
        description:
          'Every role may ask. A client uses it to show only the actions the key may take; the API still checks each permission on every call.',
        security: bearer,
        response: { 200: callerSchema, ...authProblems },
      },
    },
    async (request) => {
      const context = requestContext(request, deps);
      return describeCaller(deps.store.db, context.principal);
    },
  );
}
