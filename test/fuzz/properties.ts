/**
 * What every answer must satisfy, whatever was sent: never a 5xx; a 4xx is
 * RFC 9457 problem+json with type, title, status and detail; no answer
 * carries a stack trace or a source path (common practice: error bodies
 * leak no internals).
 */
import type { FuzzRoute } from './openapi-routes.js';
import type { FuzzRequest } from './requests.js';

export interface FuzzResponse {
  status: number;
  headers: Record<string, unknown>;
  body: string;
}

const STACK_LINE = /(?:\\n|\n)\s*at \S+.*(?:\(|\s)\S*:\d+:\d+/;
const SOURCE_PATH = /\.(?:ts|js|mjs|cjs):\d+(?::\d+)?/;
const LEAKS = [STACK_LINE, SOURCE_PATH, /node_modules/, /"stack"\s*:/];

/** A readable account of the request, for failure messages (long parts cut). */
export function describeRequest(request: FuzzRequest): string {
  const cut = (text: string) => (text.length > 400 ? `${text.slice(0, 400)}… (${text.length} chars)` : text);
  const payload =
    request.payload === undefined
      ? '(none)'
      : Buffer.isBuffer(request.payload)
        ? `bytes ${request.payload.toString('hex').slice(0, 400)}`
        : JSON.stringify(cut(request.payload));
  return `${request.method} ${cut(request.url)}\nheaders: ${cut(JSON.stringify(request.headers))}\nbody: ${payload}\nkind: ${request.kind}`;
}

/** Why the answer breaks the contract, or null when it keeps it. */
export function contractViolation(request: FuzzRequest, response: FuzzResponse, sourceRoot: string): string | null {
  const { status, body } = response;
  if (status >= 500) return `answered ${status}`;
  if (!((status >= 200 && status < 300) || (status >= 400 && status < 500)))
    return `answered ${status} (neither 2xx nor 4xx)`;
  const sent = `${request.url} ${typeof request.payload === 'string' ? request.payload : ''}`;
  for (const leak of [...LEAKS, new RegExp(sourceRoot.replace(/[.*+?^${}()|[\]\\]/g, '\\$&'))]) {
    if (leak.test(body) && !leak.test(sent)) return `the body leaks internals (${leak}): ${body.slice(0, 300)}`;
  }
  const contentType = String(response.headers['content-type'] ?? '');
  if (status >= 400) {
    if (!contentType.startsWith('application/problem+json'))
      return `a ${status} came as ${contentType || 'no content type'}: ${body.slice(0, 200)}`;
    let problem: Record<string, unknown>;
    try {
      problem = JSON.parse(body) as Record<string, unknown>;
    } catch {
      return `a ${status} problem body is not JSON: ${body.slice(0, 200)}`;
    }
    for (const member of ['type', 'title', 'detail'] as const) {
      if (typeof problem[member] !== 'string' || (problem[member] as string).length === 0)
        return `the problem has no ${member}: ${body.slice(0, 200)}`;
    }
    if (problem.status !== status)
      return `the problem says status ${String(problem.status)} but the answer is ${status}`;
    if (problem.errors !== undefined) {
      const ok =
        Array.isArray(problem.errors) &&
        problem.errors.every((e) => typeof e?.field === 'string' && typeof e?.message === 'string');
      if (!ok) return `the problem's errors are not [{field, message}]: ${body.slice(0, 200)}`;
    }
    return null;
  }
  if (contentType.includes('json')) {
    try {
      JSON.parse(body);
    } catch {
      return `a ${status} JSON answer does not parse: ${body.slice(0, 200)}`;
    }
  }
  return null;
}

/** A 2xx for a JSON body that is not an object, on a route whose body schema is one. */
export function bodyShapeViolation(route: FuzzRoute, request: FuzzRequest, response: FuzzResponse): string | null {
  if (response.status >= 300 || route.body?.type !== 'object' || typeof request.payload !== 'string') return null;
  if (!/^application\/json/i.test(request.headers['content-type'] ?? '')) return null;
  let parsed: unknown;
  try {
    parsed = JSON.parse(request.payload);
  } catch {
    return null;
  }
  const isObject = typeof parsed === 'object' && parsed !== null && !Array.isArray(parsed);
  return isObject ? null : `accepted (${response.status}) a JSON body that is not an object`;
}
