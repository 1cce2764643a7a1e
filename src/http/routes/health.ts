/** Liveness and readiness for process managers and load balancers. */
import { sql } from 'kysely';
import { z } from 'zod';
import type { RouteDeps } from '../route-deps.js';
import { Problem, PROBLEM_CONTENT_TYPE } from '../problem.js';
import { problemSchema } from '../schemas/common.js';
import { databaseFault, faultRecord } from '../../store/faults.js';
import type { ApiApp } from './types.js';

/** How long /readyz waits for the database before saying it does not answer (a probe must answer promptly). */
export const READINESS_TIMEOUT_MS = 2000;

/** The state of the database when it is not ready, as /readyz names it. */
const DATABASE_STATES = ['unreachable', 'busy', 'not-answering', 'failing'] as const;
type DatabaseState = (typeof DATABASE_STATES)[number];

const DETAILS: Record<DatabaseState, string> = {
  unreachable: 'the database cannot be reached (no connection can be made, or the connection was lost)',
  busy: 'the database is busy with another writer',
  'not-answering': `the database did not answer within ${READINESS_TIMEOUT_MS} ms`,
  failing: 'the database answers with an error',
};

export function healthRoutes(app: ApiApp, deps: RouteDeps): void {
  app.get(
    '/healthz',
    {
      config: { rateLimit: false },
      schema: {
        tags: ['health'],
        summary: 'The process is up',
        response: { 200: z.object({ status: z.literal('ok') }) },
      },
    },
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
        description:
          'Ready: 200. Not ready: 503 problem+json whose `database` names the state of the dependency that is down (unreachable, busy, not-answering, failing).',
        response: {
          200: z.object({ status: z.literal('ready'), database: z.string() }),
          503: problemSchema.extend({
            database: z.enum(DATABASE_STATES).describe('The state of the database, the dependency that is down'),
          }),
        },
      },
    },
    async (request, reply) => {
      const state = await databaseState(deps);
      if (state === null) return { status: 'ready' as const, database: deps.store.dialect };
      const problem = new Problem('unavailable', DETAILS[state]);
      return reply
        .code(503)
        .header('retry-after', '5')
        .type(PROBLEM_CONTENT_TYPE)
        .send({ ...problem.body(request.url.split('?')[0]), database: state });
    },
  );

  /** null when the database answers a trivial query in time; otherwise what is wrong with it (logged, without secrets). */
  async function databaseState(deps: RouteDeps): Promise<DatabaseState | null> {
    let timer: NodeJS.Timeout | undefined;
    const timeout = new Promise<'not-answering'>((resolve) => {
      timer = setTimeout(() => resolve('not-answering'), READINESS_TIMEOUT_MS);
    });
    const probe = sql`select 1`.execute(deps.store.db).then(
      () => null,
      (error: unknown): DatabaseState => {
        app.log.warn({ database: faultRecord(error) }, 'readiness: the database is not available');
        const fault = databaseFault(error);
        return fault === 'busy' ? 'busy' : fault !== null ? 'unreachable' : 'failing';
      },
    );
    try {
      return await Promise.race([probe, timeout]);
    } finally {
      clearTimeout(timer);
    }
  }
}
