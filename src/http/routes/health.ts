/** Liveness and readiness for process managers and load balancers. */
import { sql } from 'kysely';
import { z } from 'zod';
import type { RouteDeps } from '../app.js';
import { Problem } from '../problem.js';
import { problemSchema } from '../schemas/common.js';
import type { ApiApp } from './types.js';

export function healthRoutes(app: ApiApp, deps: RouteDeps): void {
  app.get(
    '/healthz',
    { config: { rateLimit: false }, schema: { tags: ['health'], summary: 'The process is up', response: { 200: z.object({ status: z.literal('ok') }) } } },
    async () => ({ status: 'ok' as const }),
  );
  app.get(
    '/readyz',
    {
      // Probes of a load balancer must never be refused for coming often.
      config: { rateLimit: false },
      schema: {
        tags: ['health'],
        summary: 'The database answers',
        response: { 200: z.object({ status: z.literal('ready'), database: z.string() }), 503: problemSchema },
      },
    },
    async (_request, reply) => {
      try {
        await sql`select 1`.execute(deps.store.db);
      } catch {
        const problem = new Problem('internal', 'the database does not answer');
        return reply.code(503).type('application/problem+json').send({ ...problem.body(), status: 503 });
      }
      return { status: 'ready' as const, database: deps.store.dialect };
    },
  );
}
