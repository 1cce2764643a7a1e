/** /v1/facilities/{id}/calendar: the facility's day types, weekly pattern and dated exceptions. */
import type { FastifyRequest } from 'fastify';
import type { RouteDeps } from '../route-deps.js';
import { getCalendar, loadCalendar, putCalendar } from '../../services/calendars.js';
import { getFacilityRow } from '../../services/facilities.js';
import { authProblems, bearer, idParams, idempotencyHeaders, writeProblems } from '../schemas/common.js';
import { calendarSchema, putCalendarBody, putCalendarQuery } from '../schemas/calendars.js';
import { requestContext } from '../request-context.js';
import { Problem } from '../problem.js';
import { recordLocator } from './readings.js';
import type { ApiApp } from './types.js';

export function calendarsRoutes(app: ApiApp, deps: RouteDeps): void {
  /**
   * A CSV body carries only the exceptions: the day types and weekly pattern
   * come from the query or, when it has none, from the stored calendar.
   */
  async function completeCsvCalendar(request: FastifyRequest): Promise<void> {
    if (!request.sentAsCsv) return;
    const body = request.body as Record<string, unknown>;
    const query = request.query as Record<string, unknown>;
    const listed = (name: string) =>
      typeof query[name] === 'string'
        ? (query[name] as string)
            .split(',')
            .map((part) => part.trim())
            .filter((part) => part !== '')
        : undefined;
    let dayTypes = listed('dayTypes');
    let weekly = listed('weekly');
    if (dayTypes === undefined || weekly === undefined) {
      const facilityId = (request.params as { id: string }).id;
      const { organisationId } = requestContext(request, deps);
      await getFacilityRow(deps.store.db, organisationId, facilityId);
      const stored = await loadCalendar(deps.store.db, facilityId);
      const missing = dayTypes === undefined ? 'dayTypes' : 'weekly';
      if (!stored) {
        const message = `facility ${facilityId} has no calendar to keep its ${missing} from: give dayTypes and weekly as query parameters beside the CSV of exceptions`;
        throw new Problem('validation', `query.${missing}: ${message}`, [{ field: `query.${missing}`, message }]);
      }
      dayTypes ??= stored.dayTypes;
      weekly ??= stored.weekly;
    }
    request.body = { dayTypes, weekly, ...body };
  }

  app.put(
    '/v1/facilities/:id/calendar',
    {
      config: { permission: 'ledger', csvBody: 'exceptions' },
      preValidation: completeCsvCalendar,
      schema: {
        tags: ['variables'],
        summary: "Replace a facility's calendar",
        description:
          'Replaced whole, all or nothing: an unknown day type or overlapping exceptions are refused (400 naming the field, or the CSV row); a change to the day type of any day inside a frozen baseline window of one of the facility’s meters is refused (409). Fits use it with options.dayTypes.',
        security: bearer,
        params: idParams,
        headers: idempotencyHeaders,
        querystring: putCalendarQuery,
        body: putCalendarBody,
        response: { 200: calendarSchema, ...writeProblems },
      },
    },
    async (request) =>
      putCalendar(
        requestContext(request, deps).service,
        request.params.id,
        request.body,
        recordLocator(request, 'exceptions'),
      ),
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
