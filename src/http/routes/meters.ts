/** Routes of this resource: to be written. */
import type { RouteDeps } from '../app.js';
import type { ApiApp } from './types.js';

export function metersRoutes(_app: ApiApp, _deps: RouteDeps): void {}
