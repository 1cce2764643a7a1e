/** /v1/audit: the organisation's audit trail, and a check of the whole hash chain. */
import type { RouteDeps } from '../route-deps.js';
import { requestContext } from '../request-context.js';
import { listAuditEntries, verifyAudit } from '../../services/audit.js';
import { listAuditCheckpoints, requestCheckpoint } from '../../services/audit-checkpoints.js';
import { authProblems, bearer, writeProblems } from '../schemas/common.js';
import {
  auditPageSchema,
  auditQuery,
  chainVerdictSchema,
  checkpointPageSchema,
  checkpointsQuery,
  signedCheckpointSchema,
  verifyQuery,
} from '../schemas/audit.js';
import type { ApiApp } from './types.js';

export function auditRoutes(app: ApiApp, deps: RouteDeps): void {
  app.get(
    '/v1/audit',
    {
      config: { permission: 'read' },
      schema: {
        tags: ['audit'],
        summary: "The organisation's audit trail, oldest first",
        description:
          'Every write, in sequence order: who (API key id or "system"), when, what, and the entity before and after. In pages (default 100, at most 1000): follow nextCursor (or pass `next` as `after`).',
        security: bearer,
        querystring: auditQuery,
        response: { 200: auditPageSchema, ...authProblems },
      },
    },
    async (request) => {
      const { entity, entityId, since, limit, after, cursor } = request.query;
      return listAuditEntries(deps.store.db, requestContext(request, deps).organisationId, {
        limit,
        ...(entity !== undefined ? { entityType: entity } : {}),
        ...(entityId !== undefined ? { entityId } : {}),
        ...(since !== undefined ? { since } : {}),
        ...(after !== undefined ? { afterSeq: after } : {}),
        ...(cursor !== undefined ? { cursor } : {}),
      });
    },
  );

  app.get(
    '/v1/audit/verify',
    {
      config: { permission: 'read' },
      schema: {
        tags: ['audit'],
        summary: 'Check the audit hash chain, the frozen baselines and (depth=full) every table against the trail',
        description:
          "Walks the organisation's chain and names the first row whose content or link does not match; compares every frozen baseline's content with the hash its freeze row recorded; with depth=full, replays the trail and names every stored reading, weather day, rate, contract, normal year, adjustment or API key that differs from it or that no audit row wrote. Record headHash elsewhere (or use the signed checkpoints): a later run can then also detect rows cut off the end.",
        security: bearer,
        querystring: verifyQuery,
        response: { 200: chainVerdictSchema, ...authProblems },
      },
    },
    async (request) => verifyAudit(deps.store.db, requestContext(request, deps).organisationId, request.query.depth),
  );

  app.get(
    '/v1/audit/checkpoints',
    {
      config: { permission: 'read' },
      schema: {
        tags: ['audit'],
        summary: "Signed checkpoints of the organisation's audit head, oldest first",
        description:
          'The service signs the head of the audit chain (its last row’s sequence number and hash) with an Ed25519 key held outside the database: periodically (CHECKPOINT_INTERVAL_SECONDS), on every issued statement, and on request. With the public key given here (keep a copy from a trusted moment) and an export, `mvledger verify` proves that the trail up to each checkpoint has not been rewritten or cut since it was signed.',
        security: bearer,
        querystring: checkpointsQuery,
        response: { 200: checkpointPageSchema, ...authProblems },
      },
    },
    async (request) =>
      listAuditCheckpoints(deps.store.db, deps.checkpointSigner, requestContext(request, deps).organisationId, {
        limit: request.query.limit,
        ...(request.query.cursor !== undefined ? { cursor: request.query.cursor } : {}),
      }),
  );

  app.post(
    '/v1/audit/checkpoints',
    {
      config: { permission: 'approve' },
      schema: {
        tags: ['audit'],
        summary: 'Sign the current audit head now',
        description:
          'Signs the head of the organisation’s chain unless the key has signed it already (then answers that checkpoint). 422 when the service holds no checkpoint key.',
        security: bearer,
        response: { 200: signedCheckpointSchema, ...writeProblems },
      },
    },
    async (request) => {
      const context = requestContext(request, deps);
      return requestCheckpoint(deps.store.db, deps.checkpointSigner, context.organisationId, context.service.now);
    },
  );
}
