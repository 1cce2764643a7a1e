/**
 * The protective headers of a response that no route and no hook produced:
 * problems the framework answers before any hook runs (a malformed URL, a
 * path parameter over the limit) and errors of the connection itself
 * (malformed HTTP, a request that took too long to arrive). helmet covers
 * every response that passes the onRequest hooks; these cover the rest, so
 * that every response carries them.
 */
import { STATUS_CODES } from 'node:http';
import type { Socket } from 'node:net';
import type { FastifyReply } from 'fastify';
import { PROBLEM_CONTENT_TYPE } from './problem.js';

/** For a problem+json body: nothing to load, nothing to frame, nothing to sniff (common practice: OWASP secure headers). */
export const PROBLEM_SECURITY_HEADERS: Readonly<Record<string, string>> = {
  'content-security-policy': "default-src 'none'; frame-ancestors 'none'",
  'cross-origin-resource-policy': 'same-origin',
  'referrer-policy': 'no-referrer',
  'x-content-type-options': 'nosniff',
  'x-frame-options': 'DENY',
};

/** Adds each header helmet has not already set on this reply. */
export function addMissingSecurityHeaders(reply: FastifyReply): FastifyReply {
  for (const [name, value] of Object.entries(PROBLEM_SECURITY_HEADERS))
    if (!reply.hasHeader(name)) reply.header(name, value);
  return reply;
}

/**
 * Node's `clientError`: the request never became one fastify could route.
 * Answered as problem+json with the protective headers, then the
 * connection is closed (as Node does by default).
 */
export function answerClientError(error: NodeJS.ErrnoException, socket: Socket): void {
  if (error.code === 'ECONNRESET' || socket.destroyed) return;
  const [status, detail] =
    error.code === 'ERR_HTTP_REQUEST_TIMEOUT'
      ? [408, 'the request did not arrive in time; send it again without pausing']
      : error.code === 'HPE_HEADER_OVERFLOW'
        ? [431, 'the request headers are too large']
        : [400, 'the request is not valid HTTP'];
  const body = JSON.stringify({
    type: 'urn:mvledger:problem:client-error',
    title: STATUS_CODES[status],
    status,
    detail,
  });
  const headers = Object.entries(PROBLEM_SECURITY_HEADERS)
    .map(([name, value]) => `${name}: ${value}\r\n`)
    .join('');
  if (socket.writable) {
    socket.write(
      `HTTP/1.1 ${status} ${STATUS_CODES[status]}\r\nContent-Type: ${PROBLEM_CONTENT_TYPE}\r\nContent-Length: ${Buffer.byteLength(body)}\r\n` +
        `${headers}Connection: close\r\n\r\n${body}`,
    );
  }
  socket.destroy();
}
