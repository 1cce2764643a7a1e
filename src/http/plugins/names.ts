/**
 * The names of the app's plugins. Each plugin is wrapped by fastify-plugin
 * with its name and the names it depends on, so fastify itself refuses to
 * start when one is registered before what it needs (app.ts registers them
 * bottom first).
 */
export const PLUGIN = {
  /** Every answer carries the request's id (x-request-id). */
  requestId: 'mvledger-request-id',
  /** The error handler: every refusal leaves as problem+json. */
  problems: 'mvledger-problems',
  /** Bearer keys: sets request.principal and checks the route's permission. */
  auth: 'mvledger-auth',
  /** Requests per minute per key (registered always; idle when no limit is set). */
  rateLimit: 'mvledger-rate-limit',
  /** text/csv bodies turned into the JSON the route's schema validates. */
  csvBodies: 'mvledger-csv-bodies',
  /** Strings in NFC; lone surrogates refused. */
  textInput: 'mvledger-text-input',
  /** Idempotency-Key on writes. */
  idempotency: 'mvledger-idempotency',
  /** The /app workbench's page and files, under their own content security policy. */
  workbench: 'mvledger-workbench',
  /** Every route module. */
  routes: 'mvledger-routes',
  /** Third-party plugins' own names, as their packages declare them. */
  helmet: '@fastify/helmet',
  swagger: '@fastify/swagger',
} as const;

/** The fastify major version the plugins are written for. */
export const FASTIFY_VERSION = '5.x';
