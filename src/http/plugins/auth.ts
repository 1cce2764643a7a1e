/**
 * Bearer API keys. Every route under /v1 declares the permission it needs in
 * its config; the key's role must grant it. Unknown, malformed and revoked
 * keys all get the same 401 (no hint which); an address with too many
 * failures in a minute gets 429 (failed-authentication.ts).
 */
import fp from 'fastify-plugin';
import type { Store } from '../../store/connect.js';
import { authenticate } from '../../store/api-keys.js';
import { allows } from '../../domain/principal.js';
import '../principal.js';
import { Problem } from '../problem.js';
import type { FailedAuthenticationLimit } from './failed-authentication.js';
import { FASTIFY_VERSION, PLUGIN } from './names.js';

const BEARER = /^Bearer +(\S+) *$/i;

function authorizationLines(rawHeaders: readonly string[]): number {
  let lines = 0;
  for (let i = 0; i < rawHeaders.length; i += 2) if (rawHeaders[i]!.toLowerCase() === 'authorization') lines++;
  return lines;
}

export interface AuthOptions {
  store: Store;
  /** Failed authentications per address; null: no limit. */
  failures: FailedAuthenticationLimit | null;
}

/** Sets request.principal on every route with a permission, and refuses a request without a live key or the permission. */
export const authPlugin = fp<AuthOptions>(
  async (app, { store, failures }) => {
    app.addHook('onRequest', async (request, reply) => {
      const permission = request.routeOptions.config?.permission;
      if (!permission) return;
      const wait = failures?.retryAfterSeconds(request.ip) ?? 0;
      if (wait > 0) {
        reply.header('retry-after', String(wait));
        throw new Problem(
          'rate-limited',
          `more than ${failures!.limit} failed authentications a minute from this address; retry after ${wait} s`,
        );
      }
      const header = request.headers.authorization;
      // The scheme is case-insensitive (RFC 9110 §11.1). Two Authorization lines are
      // ambiguous (node keeps only the first), so they authenticate nothing.
      const token =
        typeof header === 'string' && authorizationLines(request.raw.rawHeaders) === 1
          ? (BEARER.exec(header)?.[1] ?? null)
          : null;
      const key = token ? await authenticate(store.db, token) : null;
      if (!key) {
        failures?.recordFailure(request.ip);
        reply.header('www-authenticate', 'Bearer realm="mvledger"');
        throw new Problem('unauthorized', 'send Authorization: Bearer <API key> with a live key');
      }
      request.principal = { keyId: key.id, organisationId: key.organisation_id, role: key.role };
      if (!allows(key.role, permission)) {
        throw new Problem(
          'forbidden',
          `the ${key.role} role does not have the "${permission}" permission this route needs`,
        );
      }
    });
  },
  // Its refusals are problems.
  { name: PLUGIN.auth, fastify: FASTIFY_VERSION, dependencies: [PLUGIN.problems] },
);
