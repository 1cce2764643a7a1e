/** Every route module, registered in one place so the API surface is visible at a glance. */
import type { RouteDeps } from '../app.js';
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
import { reportsRoutes } from './reports.js';
import { meRoutes } from './me.js';
import type { ApiApp } from './types.js';

export async function registerRoutes(app: ApiApp, deps: RouteDeps): Promise<void> {
  healthRoutes(app, deps);
  weatherStationRoutes(app, deps);
  facilitiesRoutes(app, deps);
  metersRoutes(app, deps);
  readingsRoutes(app, deps);
  observationsRoutes(app, deps);
  baselinesRoutes(app, deps);
  savingsRoutes(app, deps);
  adjustmentsRoutes(app, deps);
  ratesRoutes(app, deps);
  contractsRoutes(app, deps);
  normalYearsRoutes(app, deps);
  reportsRoutes(app, deps);
  auditRoutes(app, deps);
  apiKeysRoutes(app, deps);
  meRoutes(app, deps);
}
