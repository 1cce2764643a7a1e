/** /v1/facilities/{id}/calendar: the facility's day types, weekly pattern and dated exceptions. */
import type { RouteDeps } from '../route-deps.js';
import { getCalendar, putCalendar } from '../../services/calendars.js';
import { authProblems, bearer, idParams, idempotencyHeaders, writeProblems } from '../schemas/common.js';
import { calendarSchema, putCalendarBody } from '../schemas/calendars.js';
import { requestContext } from '../request-context.js';
import type { ApiApp } from './types.js';

export function calendarsRoutes(app: ApiApp, deps: RouteDeps): void {
  app.put(
    '/v1/facilities/:id/calendar',
    {
      config: { permission: 'ledger' },
      schema: {
        tags: ['variables'],
        summary: "Replace a facility's calendar",
        description:
          'Replaced whole, all or nothing: an unknown day type or overlapping exceptions are refused (400 naming the field); a change to the day type of any day inside a frozen baseline window of one of the facility’s meters is refused (409). Fits use it with options.dayTypes.',
        security: bearer,
        params: idParams,
        headers: idempotencyHeaders,
        body: putCalendarBody,
        response: { 200: calendarSchema, ...writeProblems },
      },
    },
    async (request) => putCalendar(requestContext(request, deps).service, request.params.id, request.body),
  );

  app.get(
    '/v1/facilities/:id/calendar',
    {
      config: { permission: 'read' },
      schema: {
        tags: ['variables'],
        summary: "A facility's calendar",
        security: bearer,
        params: idParams,
        response: { 200: calendarSchema, ...authProblems },
      },
    },
    async (request) => getCalendar(deps.store.db, requestContext(request, deps).organisationId, request.params.id),
  );
}
