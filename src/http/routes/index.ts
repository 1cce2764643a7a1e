/** Every route module, registered in one place so the API surface is visible at a glance. */
import type { RouteDeps } from '../app.js';
import { healthRoutes } from './health.js';
import { weatherStationRoutes } from './weather-stations.js';
import type { ApiApp } from './types.js';

export async function registerRoutes(app: ApiApp, deps: RouteDeps): Promise<void> {
  healthRoutes(app, deps);
  weatherStationRoutes(app, deps);
}
