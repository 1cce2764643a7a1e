/**
 * How the app is put together: every plugin is named and declares what it
 * needs, so fastify itself refuses a wrong order; routes read their caller
 * through one helper. Check values: fastify's documented dependency check
 * (fastify-plugin `dependencies`); the rest is synthetic: the test sets it.
 */
import Fastify from 'fastify';
import type { FastifyRequest } from 'fastify';
import { afterAll, describe, expect, it } from 'vitest';
import { buildApp } from '../../src/http/app.js';
import { PLUGIN } from '../../src/http/plugins/names.js';
import { problemsPlugin } from '../../src/http/plugins/problems.js';
import { authPlugin } from '../../src/http/plugins/auth.js';
import { textInputPlugin } from '../../src/http/plugins/text-input.js';
import { idempotencyPlugin } from '../../src/http/plugins/idempotency.js';
import { routesPlugin } from '../../src/http/routes/index.js';
import { requestContext } from '../../src/http/request-context.js';
import type { RouteDeps } from '../../src/http/route-deps.js';
import { DomainError } from '../../src/domain/errors.js';
import { SavingsCache } from '../../src/services/savings-cache.js';
import { openStore } from '../../src/store/connect.js';

// Nothing is queried: the plugins only need a store to hold.
const store = openStore('sqlite::memory:');
afterAll(async () => store.close());

const deps: RouteDeps = { store, now: () => '2026-03-01T12:00:00.000Z', savingsCache: new SavingsCache(0) };

async function readyError(register: (app: ReturnType<typeof Fastify>) => void): Promise<string> {
  const app = Fastify();
  register(app);
  try {
    await app.ready();
    return 'ready';
  } catch (error) {
    return (error as Error).message;
  } finally {
    await app.close();
  }
}

describe('plugin order, enforced by fastify', () => {
  it('builds the app with every plugin of ours registered by name', async () => {
    const app = await buildApp({ store });
    try {
      await app.ready();
      for (const name of Object.values(PLUGIN)) expect(app.hasPlugin(name), name).toBe(true);
    } finally {
      await app.close();
    }
  });

  it('refuses authentication registered before the problem handler', async () => {
    const message = await readyError((app) => app.register(authPlugin, { store, failures: null }));
    expect(message).toContain(PLUGIN.problems);
  });

  it('refuses the text checks before the CSV bodies they name rows of', async () => {
    const message = await readyError((app) => {
      app.register(problemsPlugin);
      app.register(textInputPlugin);
    });
    expect(message).toContain(PLUGIN.csvBodies);
  });

  it('refuses idempotency before authentication', async () => {
    const message = await readyError((app) => {
      app.register(problemsPlugin);
      app.register(idempotencyPlugin, { store, now: deps.now });
    });
    expect(message).toContain(PLUGIN.auth);
  });

  it('refuses the routes before the plugins they rely on', async () => {
    const message = await readyError((app) => app.register(routesPlugin, deps));
    expect(message).toContain(PLUGIN.problems);
  });
});

describe('the request context', () => {
  const principal = { keyId: 'key_1', organisationId: 'org_1', role: 'analyst' as const };

  it('gives the caller, its organisation and the service context', () => {
    const context = requestContext({ principal } as FastifyRequest, deps);
    expect(context.principal).toBe(principal);
    expect(context.organisationId).toBe('org_1');
    expect(context.service).toEqual({ store, principal, now: '2026-03-01T12:00:00.000Z' });
  });

  it('refuses a request without an authenticated caller as unauthorized', () => {
    let thrown: unknown;
    try {
      requestContext({} as FastifyRequest, deps);
    } catch (error) {
      thrown = error;
    }
    expect(thrown).toBeInstanceOf(DomainError);
    expect((thrown as DomainError).kind).toBe('unauthorized');
  });
});
