/**
 * Text as the ledger stores it: every string of a request body and query is
 * Unicode NFC, and a lone UTF-16 surrogate (which JSON's \uD800 escapes can
 * carry but UTF-8 cannot encode) is refused naming the field. Without this a
 * name could be stored as invalid UTF-8 that no longer matches its audit
 * record, or two spellings of one name (composed and decomposed) could look
 * identical and differ.
 */
import type { FastifyRequest } from 'fastify';
import fp from 'fastify-plugin';
import { Problem } from '../problem.js';
import { describePath } from './problems.js';
import { FASTIFY_VERSION, PLUGIN } from './names.js';

/** With the u flag a paired surrogate is one code point, so this matches only a lone one. */
const LONE_SURROGATE = /\p{Surrogate}/u;

/** A container met on the walk, with the way back to the root (for naming a bad field). */
interface Visit {
  container: Record<string, unknown> | unknown[];
  key: string | null;
  parent: Visit | null;
}

function pathOf(visit: Visit, last: string): string[] {
  const path = [last];
  for (let at: Visit | null = visit; at !== null && at.key !== null; at = at.parent) path.push(at.key);
  return path.reverse();
}

/**
 * Replaces every string inside `root` by its NFC form; returns the path of
 * the first string (or field name) with a lone surrogate, or null. An
 * explicit stack, not recursion: a body may nest thousands of levels deep
 * before the schema refuses it.
 */
function normaliseInPlace(root: Record<string, unknown> | unknown[]): string[] | null {
  const stack: Visit[] = [{ container: root, key: null, parent: null }];
  while (stack.length > 0) {
    const visit = stack.pop()!;
    const container = visit.container as Record<string, unknown>;
    for (const key of Object.keys(container)) {
      if (LONE_SURROGATE.test(key)) return pathOf(visit, '(a field name)');
      const item = container[key];
      if (typeof item === 'string') {
        if (LONE_SURROGATE.test(item)) return pathOf(visit, key);
        const normal = item.normalize('NFC');
        if (normal !== item) container[key] = normal;
      } else if (item !== null && typeof item === 'object') {
        stack.push({ container: item as Record<string, unknown>, key, parent: visit });
      }
    }
  }
  return null;
}

function check(request: FastifyRequest, part: 'body' | 'query'): void {
  const value = request[part];
  if (typeof value === 'string') {
    if (LONE_SURROGATE.test(value)) throw loneSurrogate(part === 'body' ? '(body)' : 'query');
    if (part === 'body') request.body = value.normalize('NFC');
    return;
  }
  if (value === null || typeof value !== 'object') return;
  const bad = normaliseInPlace(value as Record<string, unknown>);
  if (bad === null) return;
  const where = describePath(`/${bad.join('/')}`, part === 'body' ? request : undefined);
  throw loneSurrogate(part === 'body' ? where : `query.${where}`);
}

function loneSurrogate(field: string): Problem {
  return new Problem('validation', `${field}: contains a lone UTF-16 surrogate, which is not text`, [
    { field, message: 'a lone UTF-16 surrogate is not text' },
  ]);
}

/** Normalises the query's and body's strings before validation; a lone surrogate is refused naming its field. */
export const textInputPlugin = fp(
  async (app) => {
    app.addHook('preValidation', async (request) => {
      check(request, 'query');
      check(request, 'body');
    });
  },
  // After the CSV hook (preValidation hooks run in order): a CSV body is checked as the JSON it became, naming its rows.
  { name: PLUGIN.textInput, fastify: FASTIFY_VERSION, dependencies: [PLUGIN.problems, PLUGIN.csvBodies] },
);
