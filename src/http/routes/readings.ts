/** /v1/meters/{id}/readings: bills and interval data, posted in batches (JSON or CSV). */
import type { FastifyRequest } from 'fastify';
import type { RouteDeps } from '../route-deps.js';
import { listReadings, postReadings, type RecordLocator } from '../../services/readings.js';
import { describePath } from '../plugins/problems.js';
import { authProblems, bearer, idParams, idempotencyHeaders, writeProblems } from '../schemas/common.js';
import {
  postReadingsBody,
  seriesQuery,
  postReadingsQuery,
  postReadingsResult,
  readingsList,
} from '../schemas/readings.js';
import { requestContext } from '../request-context.js';
import { PAGE_SIZES } from '../../services/paging.js';
import type { ApiApp } from './types.js';

/** Names a record as a JSON path, or as its CSV row when the body came as CSV. */
export function recordLocator(request: FastifyRequest, collection: string): RecordLocator {
  return (index, field) => describePath(`/${collection}/${index}${field ? `/${field}` : ''}`, request);
}

export function readingsRoutes(app: ApiApp, deps: RouteDeps): void {
  app.post(
    '/v1/meters/:id/readings',
    {
      config: { permission: 'data', csvBody: 'readings' },
      schema: {
        tags: ['readings'],
        summary: 'Post a batch of readings',
        description:
          'All or nothing. A reading identical to the stored one with the same start and end is counted unchanged; a different one is a correction and needs a correctionReason. A correction changes only the fields it sends: a reading resent without cost or estimated keeps the stored cost and flag (send cost: null to clear a cost). A new period overlapping a stored one, or any change inside a frozen baseline window, is refused (409).',
        security: bearer,
        params: idParams,
        headers: idempotencyHeaders,
        querystring: postReadingsQuery,
        body: postReadingsBody,
        response: { 200: postReadingsResult, 201: postReadingsResult, ...writeProblems },
      },
    },
    async (request, reply) => {
      const correctionReason = request.body.correctionReason ?? request.query.correctionReason;
      const result = await postReadings(
        requestContext(request, deps).service,
        request.params.id,
        { readings: request.body.readings, ...(correctionReason !== undefined ? { correctionReason } : {}) },
        recordLocator(request, 'readings'),
      );
      return reply.code(result.created + result.corrected > 0 ? 201 : 200).send(result);
    },
  );

  app.get(
    '/v1/meters/:id/readings',
    {
      // The integration role reads back what it posted, to reconcile.
      config: { permission: 'reconcile' },
      schema: {
        tags: ['readings'],
        summary: "A meter's readings",
        description: `Readings whose period overlaps [from, to), by start, in pages (default ${PAGE_SIZES.series.default}, at most ${PAGE_SIZES.series.max}): follow nextCursor until it is null.`,
        security: bearer,
        params: idParams,
        querystring: seriesQuery('Readings'),
        response: { 200: readingsList, ...authProblems },
      },
    },
    async (request) =>
      listReadings(deps.store.db, requestContext(request, deps).organisationId, request.params.id, request.query),
  );
}
