/** Every route module, registered in one place so the API surface is visible at a glance. */
import fp from 'fastify-plugin';
import type { ZodTypeProvider } from 'fastify-type-provider-zod';
import type { RouteDeps } from '../route-deps.js';
import { FASTIFY_VERSION, PLUGIN } from '../plugins/names.js';
import { healthRoutes } from './health.js';
import { weatherStationRoutes } from './weather-stations.js';
import { facilitiesRoutes } from './facilities.js';
import { metersRoutes } from './meters.js';
import { readingsRoutes } from './readings.js';
import { observationsRoutes } from './observations.js';
import { baselinesRoutes } from './baselines.js';
import { savingsRoutes } from './savings.js';
import { auditRoutes } from './audit.js';
import { apiKeysRoutes } from './api-keys.js';
import { adjustmentsRoutes } from './adjustments.js';
import { ratesRoutes } from './rates.js';
import { contractsRoutes } from './contracts.js';
import { normalYearsRoutes } from './normal-years.js';
import { weatherImportsRoutes } from './weather-imports.js';
import { weatherGapsRoutes } from './weather-gaps.js';
import { reportsRoutes } from './reports.js';
import { statementsRoutes } from './statements.js';
import { variablesRoutes } from './variables.js';
import { calendarsRoutes } from './calendars.js';
import { meRoutes } from './me.js';
import type { ApiApp } from './types.js';

function registerRoutes(app: ApiApp, deps: RouteDeps): void {
  healthRoutes(app, deps);
  weatherStationRoutes(app, deps);
  facilitiesRoutes(app, deps);
  metersRoutes(app, deps);
  readingsRoutes(app, deps);
  variablesRoutes(app, deps);
  calendarsRoutes(app, deps);
  observationsRoutes(app, deps);
  weatherImportsRoutes(app, deps);
  weatherGapsRoutes(app, deps);
  baselinesRoutes(app, deps);
  savingsRoutes(app, deps);
  adjustmentsRoutes(app, deps);
  ratesRoutes(app, deps);
  contractsRoutes(app, deps);
  normalYearsRoutes(app, deps);
  reportsRoutes(app, deps);
  statementsRoutes(app, deps);
  auditRoutes(app, deps);
  apiKeysRoutes(app, deps);
  meRoutes(app, deps);
}

/**
 * The routes, after every plugin whose hooks they rely on: the error handler,
 * authentication and its limits, CSV and text bodies, idempotency, and
 * swagger (which collects each route's schema as it is added).
 */
export const routesPlugin = fp<RouteDeps>(
  async (app, deps) => {
    registerRoutes(app.withTypeProvider<ZodTypeProvider>(), deps);
  },
  {
    name: PLUGIN.routes,
    fastify: FASTIFY_VERSION,
    dependencies: [
      PLUGIN.problems,
      PLUGIN.auth,
      PLUGIN.rateLimit,
      PLUGIN.csvBodies,
      PLUGIN.textInput,
      PLUGIN.idempotency,
      PLUGIN.swagger,
    ],
  },
);
