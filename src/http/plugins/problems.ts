/**
 * Every error leaves as RFC 9457 problem+json naming the field or row. Schema
 * failures name the JSON path (readings[3].end), or for CSV bodies the file
 * row (row 5, field end). A database that is busy, unreachable or lost its
 * connection is a 503 with Retry-After. Unexpected errors are logged with the
 * request id and answered with a bare 500: no stack, no internals.
 */
import type { FastifyError, FastifyReply, FastifyRequest } from 'fastify';
import fp from 'fastify-plugin';
import { hasZodFastifySchemaValidationErrors } from 'fastify-type-provider-zod';
import { Problem, PROBLEM_CONTENT_TYPE, problemFromDomain, type FieldError } from '../problem.js';
import { DomainError, summarise } from '../../domain/errors.js';
import { databaseFault, type DatabaseFault } from '../../store/faults.js';
import { addMissingSecurityHeaders } from '../security-headers.js';
import { FASTIFY_VERSION, PLUGIN } from './names.js';

/** Set by the CSV body parser: maps a record index to its line in the CSV text. */
declare module 'fastify' {
  interface FastifyRequest {
    csvLines?: { collection: string; lines: number[] };
  }
}

export function sendProblem(request: FastifyRequest, reply: FastifyReply, problem: Problem): FastifyReply {
  // Some problems leave before helmet's hook ran (the router's own refusals): the headers go on here too.
  return addMissingSecurityHeaders(reply)
    .code(problem.status)
    .type(PROBLEM_CONTENT_TYPE)
    .send(problem.body(request.url.split('?')[0]));
}

/** "/readings/3/end" → "readings[3].end", or "row 5, field end" for a CSV body. */
export function describePath(instancePath: string, request?: FastifyRequest): string {
  const parts = instancePath.split('/').filter((p) => p.length > 0);
  const csv = request?.csvLines;
  if (csv && parts[0] === csv.collection && parts.length >= 2 && /^\d+$/.test(parts[1]!)) {
    const line = csv.lines[Number(parts[1])];
    const rest = parts.slice(2).join('.');
    return rest ? `row ${line}, field ${rest}` : `row ${line}`;
  }
  let out = '';
  for (const part of parts) out += /^\d+$/.test(part) ? `[${part}]` : out ? `.${part}` : part;
  return out || '(body)';
}

function validationProblem(
  error: FastifyError & { validation: { instancePath: string; message?: string }[] },
  request: FastifyRequest,
): Problem {
  const context = (error as { validationContext?: string }).validationContext ?? 'body';
  const where = context === 'querystring' ? 'query' : context === 'params' ? 'path' : context;
  const errors: FieldError[] = error.validation.map((issue) => ({
    field:
      where === 'body' ? describePath(issue.instancePath, request) : `${where}.${describePath(issue.instancePath)}`,
    message: issue.message ?? 'invalid',
  }));
  return new Problem('validation', summarise(errors), errors);
}

/** Seconds a client should wait before retrying, by fault: a busy SQLite file frees in moments; a restarting server takes longer. */
const RETRY_AFTER_SECONDS: Record<DatabaseFault, number> = { busy: 1, 'connection-lost': 2, unreachable: 5 };

/**
 * A database that is not available right now (store/faults.ts): 503 with
 * Retry-After, never a 500. Writes run in one transaction, so a write that
 * failed this way stored all of its rows or none of them.
 */
function unavailableProblem(fault: DatabaseFault, request: FastifyRequest): Problem {
  request.log.warn({ database: fault }, 'database not available: answered 503');
  if (fault === 'busy')
    return new Problem('unavailable', 'the database is busy with another writer; nothing was stored, retry shortly');
  const what = fault === 'unreachable' ? 'cannot be reached' : 'connection was lost';
  const write =
    request.method === 'GET' || request.method === 'HEAD'
      ? ''
      : '; a write is stored whole or not at all, so send it again (a reading batch already stored is reported unchanged)';
  return new Problem('unavailable', `the database ${what}; retry shortly${write}`, undefined, {
    database: fault === 'unreachable' ? 'unreachable' : 'connection-lost',
  });
}

/** The error handler and the not-found answer, for the whole app. */
export const problemsPlugin = fp(
  async (app) => {
    app.setErrorHandler((error: FastifyError, request, reply) => {
      if (error instanceof Problem) return sendProblem(request, reply, error);
      if (error instanceof DomainError) return sendProblem(request, reply, problemFromDomain(error));
      if (hasZodFastifySchemaValidationErrors(error))
        return sendProblem(request, reply, validationProblem(error, request));
      switch (error.code) {
        case 'FST_ERR_CTP_INVALID_MEDIA_TYPE':
          return sendProblem(
            request,
            reply,
            new Problem(
              'unsupported-media-type',
              `send application/json${request.routeOptions.config?.csvBody ? ' or text/csv' : ''}`,
            ),
          );
        case 'FST_ERR_CTP_BODY_TOO_LARGE':
          return sendProblem(
            request,
            reply,
            new Problem(
              'payload-too-large',
              `the body exceeds ${app.initialConfig.bodyLimit} bytes; send smaller batches`,
            ),
          );
        case 'FST_ERR_CTP_EMPTY_JSON_BODY':
          return sendProblem(
            request,
            reply,
            new Problem('validation', 'the JSON body is empty', [{ field: '(body)', message: 'empty' }]),
          );
        case 'FST_ERR_CTP_INVALID_CONTENT_LENGTH':
          return sendProblem(request, reply, new Problem('validation', 'the Content-Length does not match the body'));
        default:
          break;
      }
      if (error.statusCode === 400 && error instanceof SyntaxError) {
        return sendProblem(
          request,
          reply,
          new Problem('validation', 'the body is not valid JSON', [{ field: '(body)', message: 'not valid JSON' }]),
        );
      }
      const fault = databaseFault(error);
      if (fault !== null)
        return sendProblem(
          request,
          reply.header('retry-after', String(RETRY_AFTER_SECONDS[fault])),
          unavailableProblem(fault, request),
        );
      if (typeof error.statusCode === 'number' && error.statusCode >= 400 && error.statusCode < 500) {
        return sendProblem(request, reply, new Problem('validation', error.message.replace(/\s+/g, ' ').slice(0, 300)));
      }
      request.log.error({ err: { type: error.name, message: error.message, code: error.code } }, 'unexpected error');
      return sendProblem(
        request,
        reply,
        new Problem('internal', `unexpected error; quote request id ${request.id} when reporting it`),
      );
    });

    app.setNotFoundHandler((request, reply) =>
      sendProblem(request, reply, new Problem('not-found', `no route ${request.method} ${request.url.split('?')[0]}`)),
    );
  },
  { name: PLUGIN.problems, fastify: FASTIFY_VERSION },
);
