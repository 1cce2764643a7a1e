/** Baselines: fit a meter's baseline window, choose a shape, freeze it, read its history and its energy signature. */
import { z } from 'zod';
import type { RouteDeps } from '../route-deps.js';
import {
  baselinePoints,
  baselineSignatureData,
  chooseModel,
  createBaseline,
  freezeBaseline,
  getBaseline,
  getNewestBaseline,
  listBaselines,
  newestBaselinePoints,
} from '../../services/baselines/index.js';
import { renderBaselineSignature } from '../../reports/svg/baseline-signature.js';
import { authProblems, bearer, idParams, idempotencyHeaders, writeProblems, pageQuery } from '../schemas/common.js';
import {
  baselineHistorySchema,
  baselinePointsSchema,
  baselineSchema,
  chooseBody,
  createBaselineBody,
  freezeBody,
  verifiedBaselineSchema,
} from '../schemas/baselines.js';
import { requestContext } from '../request-context.js';
import { PAGE_SIZES } from '../../services/paging.js';
import type { ApiApp } from './types.js';

export const SVG_CONTENT_TYPE = 'image/svg+xml; charset=utf-8';

export function baselinesRoutes(app: ApiApp, deps: RouteDeps): void {
  app.post(
    '/v1/meters/:id/baselines',
    {
      config: { permission: 'ledger' },
      schema: {
        tags: ['baselines'],
        summary: 'Fit a baseline draft',
        description:
          'Fits every changepoint shape to the meter’s readings lying fully inside [start, end) against its station’s daily weather, selects one, and keeps the result as a draft (the next version of the meter’s baseline). 422 when too few periods are usable, with the reasons.',
        security: bearer,
        headers: idempotencyHeaders,
        params: idParams,
        body: createBaselineBody,
        response: { 201: baselineSchema, ...writeProblems },
      },
    },
    async (request, reply) =>
      reply
        .code(201)
        .send(await createBaseline(requestContext(request, deps).service, request.params.id, request.body)),
  );

  app.get(
    '/v1/meters/:id/baselines',
    {
      config: { permission: 'read' },
      schema: {
        tags: ['baselines'],
        summary: 'The meter’s baseline history, newest version first',
        description: `Newest version first, in pages (default ${PAGE_SIZES.records.default}, at most ${PAGE_SIZES.records.max}): follow nextCursor.`,
        security: bearer,
        params: idParams,
        querystring: z.object(pageQuery(PAGE_SIZES.records, 'Baselines')),
        response: { 200: baselineHistorySchema, ...authProblems },
      },
    },
    async (request) =>
      listBaselines(deps.store.db, requestContext(request, deps).organisationId, request.params.id, request.query),
  );

  app.get(
    '/v1/meters/:id/baselines/newest',
    {
      config: { permission: 'read' },
      schema: {
        tags: ['baselines'],
        summary: 'The meter’s newest baseline version, with its fit and a fresh check of its content hash',
        description:
          'The same answer as GET /v1/baselines/{id} for the meter’s highest version (draft, frozen or superseded), without reading the history first. 404 when the meter has no baseline yet.',
        security: bearer,
        params: idParams,
        response: { 200: verifiedBaselineSchema, ...authProblems },
      },
    },
    async (request) =>
      getNewestBaseline(deps.store.db, requestContext(request, deps).organisationId, request.params.id),
  );

  app.get(
    '/v1/meters/:id/baselines/newest/points',
    {
      config: { permission: 'read' },
      schema: {
        tags: ['baselines'],
        summary: 'The numbers behind the charts of the meter’s newest baseline version',
        description:
          'The same answer as GET /v1/baselines/{id}/points for the meter’s highest version, without reading the history first. 404 when the meter has no baseline yet.',
        security: bearer,
        params: idParams,
        response: { 200: baselinePointsSchema, ...authProblems },
      },
    },
    async (request) =>
      newestBaselinePoints(deps.store.db, requestContext(request, deps).organisationId, request.params.id),
  );

  app.get(
    '/v1/baselines/:id',
    {
      config: { permission: 'read' },
      schema: {
        tags: ['baselines'],
        summary: 'One baseline, with its fit and a fresh check of its content hash',
        security: bearer,
        params: idParams,
        response: { 200: verifiedBaselineSchema, ...authProblems },
      },
    },
    async (request) => getBaseline(deps.store.db, requestContext(request, deps).organisationId, request.params.id),
  );

  app.post(
    '/v1/baselines/:id/choose',
    {
      config: { permission: 'ledger' },
      schema: {
        tags: ['baselines'],
        summary: 'Choose the shape of a draft',
        description:
          'Any fitted shape may be chosen; a shape that failed screening is allowed but noted in warnings. 409 once frozen.',
        security: bearer,
        headers: idempotencyHeaders,
        params: idParams,
        body: chooseBody,
        response: { 200: baselineSchema, ...writeProblems },
      },
    },
    async (request) => chooseModel(requestContext(request, deps).service, request.params.id, request.body),
  );

  app.post(
    '/v1/baselines/:id/freeze',
    {
      config: { permission: 'ledger' },
      schema: {
        tags: ['baselines'],
        summary: 'Freeze a draft',
        description:
          'Seals the draft under a SHA-256 content hash. When the meter already has a frozen baseline, supersedeReason is required and that baseline becomes superseded. A draft shorter than a full cycle of seasons (330 days of usable periods and, for bills, 12 of them) is refused (422) unless overrides.shortBaseline carries a reason; overrides.extrapolation lets savings project beyond the extrapolation limit. Overrides are kept under the content hash and shown on every document that uses the baseline. A frozen baseline can never be changed (409).',
        security: bearer,
        headers: idempotencyHeaders,
        params: idParams,
        body: freezeBody,
        response: { 200: baselineSchema, ...writeProblems },
      },
    },
    async (request) => freezeBaseline(requestContext(request, deps).service, request.params.id, request.body),
  );

  app.get(
    '/v1/baselines/:id/signature.svg',
    {
      config: { permission: 'read' },
      schema: {
        tags: ['baselines'],
        summary: 'The energy signature chart (SVG)',
        description:
          'Use per day against mean outdoor temperature: baseline periods, the chosen model’s line, and reporting periods once the baseline is frozen. For a day-resolved model the line is its daily response over the daily temperatures it saw, and each bill’s own expected use is marked beside it.',
        security: bearer,
        params: idParams,
        response: {
          200: {
            description: 'The energy signature, an SVG image',
            content: { 'image/svg+xml': { schema: z.string().describe('SVG markup') } },
          },
          ...authProblems,
        },
      },
    },
    async (request, reply) =>
      reply
        .type(SVG_CONTENT_TYPE)
        .send(
          renderBaselineSignature(
            await baselineSignatureData(deps.store.db, requestContext(request, deps).organisationId, request.params.id),
          ),
        ),
  );

  app.get(
    '/v1/baselines/:id/points',
    {
      config: { permission: 'read' },
      schema: {
        tags: ['baselines'],
        summary: 'The numbers behind the charts of every fitted shape',
        description:
          'Each usable baseline period (dates, days, quantity, use per day, mean temperature), and for every fitted shape its line, its expected use per day of each period and each period’s energy residual: what a client needs to draw all candidates on the energy signature and their residuals against time and temperature, and to show the same numbers in a table.',
        security: bearer,
        params: idParams,
        response: { 200: baselinePointsSchema, ...authProblems },
      },
    },
    async (request) => baselinePoints(deps.store.db, requestContext(request, deps).organisationId, request.params.id),
  );
}
