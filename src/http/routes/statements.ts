/** /v1/statements: issued savings statements, their stored bytes, their approval workflow and the comparison with today's data. */
import { z } from 'zod';
import type { RouteDeps } from '../route-deps.js';
import {
  approveStatement,
  compareStatement,
  getStatement,
  issueStatement,
  listStatements,
  rejectStatement,
  statementDocument,
  voidStatement,
  type StatementWindow,
} from '../../services/statements.js';
import { authProblems, bearer, idParams, idempotencyHeaders, problemSchema, writeProblems } from '../schemas/common.js';
import {
  approveStatementBody,
  documentQuery,
  issueStatementBody,
  reasonBody,
  statementComparison,
  statementList,
  statementSchema,
  voidStatementBody,
} from '../schemas/statements.js';
import { requestContext } from '../request-context.js';
import type { ApiApp } from './types.js';

const CONTENT_TYPES = {
  json: 'application/json; charset=utf-8',
  csv: 'text/csv; charset=utf-8',
  html: 'text/html; charset=utf-8',
} as const;

const TAGS = ['statements'];

export function statementsRoutes(app: ApiApp, deps: RouteDeps): void {
  app.post(
    '/v1/statements',
    {
      config: { permission: 'ledger' },
      schema: {
        tags: TAGS,
        summary: 'Issue (prepare) a savings statement',
        description:
          'Renders the savings report for the window once, on the data as it stands, and stores its bytes as JSON, CSV and HTML with their content hashes and the audit head it rests on. The statement is prepared (awaiting approval); an analyst who is not the preparer approves or rejects it. 422 when the window holds no reporting data (nothing is stored).',
        security: bearer,
        headers: idempotencyHeaders,
        body: issueStatementBody,
        response: { 201: statementSchema, ...writeProblems },
      },
    },
    async (request, reply) => {
      const { window, ...rest } = request.body;
      const resolved: StatementWindow =
        window.quarter !== undefined
          ? { quarter: window.quarter }
          : window.contractYear !== undefined
            ? { contractYear: window.contractYear }
            : { from: window.from!, to: window.to! };
      return reply
        .code(201)
        .send(await issueStatement(requestContext(request, deps).service, { ...rest, window: resolved }));
    },
  );

  app.get(
    '/v1/statements',
    {
      config: { permission: 'read' },
      schema: {
        tags: TAGS,
        summary: 'The organisation’s statements, newest first',
        security: bearer,
        response: { 200: statementList, ...authProblems },
      },
    },
    async (request) => listStatements(deps.store.db, requestContext(request, deps).organisationId),
  );

  app.get(
    '/v1/statements/:id',
    {
      config: { permission: 'read' },
      schema: {
        tags: TAGS,
        summary: 'A statement: its status, window, hashes, copies and workflow steps',
        security: bearer,
        params: idParams,
        response: { 200: statementSchema, ...authProblems },
      },
    },
    async (request) => getStatement(deps.store.db, requestContext(request, deps).organisationId, request.params.id),
  );

  app.get(
    '/v1/statements/:id/document',
    {
      config: { permission: 'read' },
      schema: {
        tags: TAGS,
        summary: 'The stored bytes of a statement (JSON, CSV or HTML)',
        description:
          'Exactly the bytes stored when the copy was made, never a re-render: the latest copy (its approval block shows every step so far) unless copy names another (1: as issued). x-content-hash is the SHA-256 of the body; x-statement-copy its copy number.',
        security: bearer,
        params: idParams,
        querystring: documentQuery,
        response: {
          200: {
            description: 'The stored statement',
            content: {
              'application/json': { schema: z.object({ format: z.literal('mvledger-savings-statement') }).loose() },
              'text/csv': { schema: z.string().describe('The report’s table with the statement’s rows first') },
              'text/html': {
                schema: z.string().describe('A printable document with page numbers and the approval block'),
              },
            },
          },
          ...authProblems,
        },
      },
    },
    async (request, reply) => {
      const format = request.query.format ?? 'json';
      const stored = await statementDocument(
        deps.store.db,
        requestContext(request, deps).organisationId,
        request.params.id,
        format,
        request.query.copy,
      );
      return reply
        .type(CONTENT_TYPES[format])
        .header('x-content-hash', stored.contentHash)
        .header('x-statement-copy', String(stored.copy))
        .send(stored.body);
    },
  );

  app.post(
    '/v1/statements/:id/approve',
    {
      config: { permission: 'approve' },
      schema: {
        tags: TAGS,
        summary: 'Approve a prepared statement',
        description:
          'By an analyst (or admin) who is not the preparer (403 otherwise). Stores a new copy whose approval block names both people with their roles and UTC times. 409 unless the statement is prepared.',
        security: bearer,
        headers: idempotencyHeaders,
        params: idParams,
        body: approveStatementBody,
        response: { 200: statementSchema, ...writeProblems },
      },
    },
    async (request) => approveStatement(requestContext(request, deps).service, request.params.id),
  );

  app.post(
    '/v1/statements/:id/reject',
    {
      config: { permission: 'approve' },
      schema: {
        tags: TAGS,
        summary: 'Reject a prepared statement, with a reason',
        description: 'By an analyst (or admin) who is not the preparer. 409 unless the statement is prepared.',
        security: bearer,
        headers: idempotencyHeaders,
        params: idParams,
        body: reasonBody,
        response: { 200: statementSchema, ...writeProblems },
      },
    },
    async (request) => rejectStatement(requestContext(request, deps).service, request.params.id, request.body),
  );

  app.post(
    '/v1/statements/:id/void',
    {
      config: { permission: 'approve' },
      schema: {
        tags: TAGS,
        summary: 'Void a statement, with a reason and optionally its replacement',
        description:
          'A prepared or approved statement stops being in force; a new copy marked void is stored, and every earlier copy stays. 409 when already voided or rejected.',
        security: bearer,
        headers: idempotencyHeaders,
        params: idParams,
        body: voidStatementBody,
        response: { 200: statementSchema, ...writeProblems },
      },
    },
    async (request) => voidStatement(requestContext(request, deps).service, request.params.id, request.body),
  );

  app.get(
    '/v1/statements/:id/compare',
    {
      config: { permission: 'read' },
      schema: {
        tags: TAGS,
        summary: 'What changed since the statement was issued',
        description:
          'Renders the statement’s request on today’s data and lists each change against the stored report (readings added or corrected, baselines superseded, adjustments added or withdrawn, contract terms, savings and cost), with the audit entries since its audit head. Nothing is stored.',
        security: bearer,
        params: idParams,
        response: { 200: statementComparison, ...authProblems, 422: problemSchema },
      },
    },
    async (request) => compareStatement(deps.store.db, requestContext(request, deps).organisationId, request.params.id),
  );
}
