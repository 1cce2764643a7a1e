/** /v1/weather-stations/{id}/gap-fills: the station's missing days filled on record. */
import type { RouteDeps } from '../route-deps.js';
import { fillWeatherGaps } from '../../services/weather-gaps.js';
import { bearer, idParams, idempotencyHeaders, writeProblems } from '../schemas/common.js';
import { gapFillBody, gapFillResult } from '../schemas/weather-gaps.js';
import { requestContext } from '../request-context.js';
import type { ApiApp } from './types.js';

export function weatherGapsRoutes(app: ApiApp, deps: RouteDeps): void {
  app.post(
    '/v1/weather-stations/:id/gap-fills',
    {
      config: { permission: 'ledger' },
      schema: {
        tags: ['weather'],
        summary: 'Fill the station’s gaps on record',
        description:
          'Days of [from, to) without an observation: gaps of at most maxInterpolationDays (default 2) between observed days by linear interpolation; longer ones from secondStationId by a least-squares line fitted on the days both observed (its RMSE stated); the rest left empty and listed. Every filled day is flagged with its method and source, counted in the coverage of every period that uses it, and named in reports. Observed days and days filled before are left alone. A filled day inside the window of a frozen baseline is a 409.',
        security: bearer,
        params: idParams,
        headers: idempotencyHeaders,
        body: gapFillBody,
        response: { 200: gapFillResult, ...writeProblems },
      },
    },
    async (request) => fillWeatherGaps(requestContext(request, deps).service, request.params.id, request.body),
  );
}
