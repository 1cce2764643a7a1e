/**
 * Requests per minute per API key (per address without one), through
 * @fastify/rate-limit. Registered always, so other plugins can name it; it
 * limits nothing when no limit is set.
 */
import fp from 'fastify-plugin';
import rateLimit from '@fastify/rate-limit';
import { Problem } from '../problem.js';
import { FASTIFY_VERSION, PLUGIN } from './names.js';

export interface RateLimitOptions {
  /** Requests per minute; 0 or absent: no limit. */
  perMinute?: number | undefined;
}

export const rateLimitPlugin = fp<RateLimitOptions>(
  async (app, { perMinute }) => {
    if (!perMinute || perMinute <= 0) return;
    await app.register(rateLimit, {
      global: true,
      // After authentication, so the bucket is the key itself (unknown keys never get this far).
      hook: 'preHandler',
      max: perMinute,
      timeWindow: 60_000,
      keyGenerator: (request) => (request.principal ? `key:${request.principal.keyId}` : `ip:${request.ip}`),
      errorResponseBuilder: (_request, context) =>
        new Problem(
          'rate-limited',
          `more than ${context.max} requests a minute for this key (or, without a key, this address); retry after ${Math.ceil(context.ttl / 1000)} s`,
        ),
    });
  },
  // The bucket is the authenticated key; the refusal a problem.
  { name: PLUGIN.rateLimit, fastify: FASTIFY_VERSION, dependencies: [PLUGIN.problems, PLUGIN.auth] },
);
