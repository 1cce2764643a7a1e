/**
 * Builds the fastify application: zod as the single source of validation,
 * types and the OpenAPI document; problem+json errors; bearer keys with
 * roles; Idempotency-Key on writes; one module per resource under routes/.
 */
import { randomUUID } from 'node:crypto';
import Fastify, { type FastifyInstance, type FastifyServerOptions } from 'fastify';
import swagger from '@fastify/swagger';
import swaggerUi from '@fastify/swagger-ui';
import { transformObjectWithoutUnused, transformWithOperationDetails } from './openapi/operation-details.js';
import helmet from '@fastify/helmet';
import { serializerCompiler, validatorCompiler } from 'fastify-type-provider-zod';
import type { Store } from '../store/connect.js';
import { problemsPlugin, sendProblem } from './plugins/problems.js';
import { requestIdPlugin } from './plugins/request-id.js';
import { authPlugin } from './plugins/auth.js';
import { rateLimitPlugin } from './plugins/rate-limit.js';
import { idempotencyPlugin } from './plugins/idempotency.js';
import { csvBodiesPlugin } from './plugins/csv-bodies.js';
import { textInputPlugin } from './plugins/text-input.js';
import { workbenchPlugin, type WorkbenchFolders } from './plugins/workbench.js';
import { FailedAuthenticationLimit } from './plugins/failed-authentication.js';
import { answerClientError } from './security-headers.js';
import { routesPlugin } from './routes/index.js';
import type { CheckpointSigner } from '../lib/checkpoint-signature.js';
import type { RouteDeps } from './route-deps.js';
import { Problem } from './problem.js';
import { SavingsCache } from '../services/savings-cache.js';

export interface AppOptions {
  store: Store;
  logger?: FastifyServerOptions['logger'];
  now?: () => string;
  /** Largest accepted request body in bytes. */
  bodyLimit?: number;
  /** Requests per minute per API key (per address without one); 0 or absent: no limit. */
  rateLimitPerMinute?: number;
  /** Failed authentications per minute per client address before 429; 0 or absent: no limit. */
  failedAuthenticationsPerMinute?: number;
  /** Longest time a whole request may take to arrive (headers and body), in ms. */
  requestTimeoutMs?: number;
  /** Longest time the request headers may take to arrive, in ms. */
  headersTimeoutMs?: number;
  /** Memory for savings documents kept per data version; 0 computes every request afresh (default SAVINGS_CACHE_BYTES). */
  savingsCacheBytes?: number;
  /** A cache to use instead (tests read its counters). */
  savingsCache?: SavingsCache;
  /** Where the /app workbench's files are (default: web/public and dist/web under the package root). */
  workbench?: WorkbenchFolders;
  /** Signs audit checkpoints (config MVLEDGER_CHECKPOINT_KEY_FILE); absent: none are signed. */
  checkpointSigner?: CheckpointSigner | undefined;
}

/** A request trickled in slowly holds a connection: the whole request must arrive within a minute, its headers within 15 s. */
export const DEFAULT_REQUEST_TIMEOUT_MS = 60_000;
export const DEFAULT_HEADERS_TIMEOUT_MS = 15_000;

export const DEFAULT_BODY_LIMIT = 16 * 1024 * 1024;
const REQUEST_ID = /^[A-Za-z0-9._-]{1,64}$/;
/** fastify's default maxParamLength, the same as the longest id idParams accepts. */
const MAX_PARAM_LENGTH = 100;

/** Keys and secrets never reach the logs. */
export const LOG_REDACTIONS = ['req.headers.authorization', 'req.headers["idempotency-key"]', 'headers.authorization'];

export async function buildApp(options: AppOptions): Promise<FastifyInstance> {
  const requestTimeout = options.requestTimeoutMs ?? DEFAULT_REQUEST_TIMEOUT_MS;
  const app = Fastify({
    logger: options.logger ?? false,
    bodyLimit: options.bodyLimit ?? DEFAULT_BODY_LIMIT,
    requestTimeout,
    // Node checks the timeouts every connectionsCheckingInterval (30 s by default): often enough for a one-minute limit.
    http: {
      headersTimeout: Math.min(options.headersTimeoutMs ?? DEFAULT_HEADERS_TIMEOUT_MS, requestTimeout),
      connectionsCheckingInterval: Math.min(1_000, requestTimeout),
    },
    clientErrorHandler: answerClientError,
    routerOptions: { maxParamLength: MAX_PARAM_LENGTH },
    requestIdHeader: false,
    genReqId: (request) => {
      const given = request.headers['x-request-id'];
      return typeof given === 'string' && REQUEST_ID.test(given) ? given : randomUUID();
    },
    // The router refuses some URLs before any hook or error handler runs (broken
    // percent-encoding, a path parameter over maxParamLength); those leave as problems too.
    frameworkErrors: (error, request, reply) => {
      reply.header('x-request-id', request.id);
      if (error.code === 'FST_ERR_MAX_PARAM_LENGTH') {
        return sendProblem(
          request,
          reply,
          new Problem('validation', `a path parameter is longer than ${MAX_PARAM_LENGTH} characters`, [
            { field: 'path', message: 'too long' },
          ]),
        );
      }
      if (error.code === 'FST_ERR_BAD_URL') {
        return sendProblem(
          request,
          reply,
          new Problem('validation', 'the URL is not valid: check its percent-encoding', [
            { field: 'path', message: 'not a valid URL' },
          ]),
        );
      }
      return sendProblem(
        request,
        reply,
        new Problem('internal', `unexpected error; quote request id ${request.id} when reporting it`),
      );
    },
  });
  app.setValidatorCompiler(validatorCompiler);
  app.setSerializerCompiler(serializerCompiler);

  const deps: RouteDeps = {
    store: options.store,
    now: options.now ?? (() => new Date().toISOString()),
    savingsCache: options.savingsCache ?? new SavingsCache(options.savingsCacheBytes),
    checkpointSigner: options.checkpointSigner,
  };
  // Bottom first; each plugin names what it needs (plugins/names.ts) and fastify refuses a wrong order.
  // Hooks of one kind run in this order: the request id, helmet's headers, then authentication (onRequest);
  // the CSV body, then its text (preValidation); idempotency, then the rate limit (preHandler).
  await app.register(requestIdPlugin);
  await app.register(problemsPlugin);
  await app.register(helmet, {
    // The API serves JSON, SVG and the docs page; nothing may be framed or sniffed.
    contentSecurityPolicy: {
      directives: {
        defaultSrc: ["'self'"],
        scriptSrc: ["'self'"],
        styleSrc: ["'self'", "'unsafe-inline'"],
        imgSrc: ["'self'", 'data:'],
        frameAncestors: ["'none'"],
        formAction: ["'self'"],
      },
    },
    crossOriginResourcePolicy: { policy: 'same-origin' },
    frameguard: { action: 'deny' },
  });
  const failures = options.failedAuthenticationsPerMinute
    ? new FailedAuthenticationLimit(options.failedAuthenticationsPerMinute)
    : null;
  await app.register(authPlugin, { store: deps.store, failures });
  await app.register(rateLimitPlugin, { perMinute: options.rateLimitPerMinute });
  await app.register(csvBodiesPlugin);
  await app.register(textInputPlugin);
  await app.register(idempotencyPlugin, { store: deps.store, now: deps.now });

  await app.register(swagger, {
    openapi: {
      openapi: '3.1.0',
      info: {
        title: 'mvledger API',
        version: '1',
        license: { name: 'Proprietary (UNLICENSED): no licence is granted' },
        description:
          'Measurement-and-verification savings ledger: facilities, meters, weather, readings, frozen changepoint baselines, avoided energy with its uncertainty, and a hash-chained audit trail. Errors are RFC 9457 problem+json.',
      },
      servers: [
        {
          url: 'http://127.0.0.1:8080',
          description: 'The service on this machine, as `npm run demo` and `npm start` run it (PORT changes the port)',
        },
      ],
      components: {
        securitySchemes: {
          bearerAuth: { type: 'http', scheme: 'bearer', description: 'An API key: mvl_<id>_<secret>' },
        },
      },
    },
    transform: transformWithOperationDetails,
    transformObject: transformObjectWithoutUnused,
  });
  await app.register(swaggerUi, {
    routePrefix: '/docs',
    uiConfig: { docExpansion: 'list' },
    theme: { title: 'mvledger API: documentation' },
  });

  await app.register(workbenchPlugin, { folders: options.workbench });
  app.get('/openapi.json', { schema: { hide: true } }, async () => app.swagger());
  await app.register(routesPlugin, deps);
  return app;
}
