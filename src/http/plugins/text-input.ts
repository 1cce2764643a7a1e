/**
 * Text as the ledger stores it: every string of a request body and query is
 * Unicode NFC, and a lone UTF-16 surrogate (which JSON's \uD800 escapes can
 * carry but UTF-8 cannot encode) is refused naming the field. Without this a
 * name could be stored as invalid UTF-8 that no longer matches its audit
 * record, or two spellings of one name (composed and decomposed) could look
 * identical and differ.
 */
import type { FastifyInstance, FastifyRequest } from 'fastify';
import { Problem } from '../problem.js';
import { describePath } from './problems.js';

/** With the u flag a paired surrogate is one code point, so this matches only a lone one. */
const LONE_SURROGATE = /\p{Surrogate}/u;

/** Why `value` cannot be stored (the path of the first bad string), or null; strings are replaced by their NFC form. */
function normaliseInPlace(value: unknown, path: string[]): string[] | null {
  if (Array.isArray(value)) {
    for (let i = 0; i < value.length; i++) {
      const item = value[i];
      if (typeof item === 'string') {
        if (LONE_SURROGATE.test(item)) return [...path, String(i)];
        value[i] = item.normalize('NFC');
      } else if (item !== null && typeof item === 'object') {
        const bad = normaliseInPlace(item, [...path, String(i)]);
        if (bad) return bad;
      }
    }
    return null;
  }
  const record = value as Record<string, unknown>;
  for (const key of Object.keys(record)) {
    if (LONE_SURROGATE.test(key)) return [...path, '(a field name)'];
    const item = record[key];
    if (typeof item === 'string') {
      if (LONE_SURROGATE.test(item)) return [...path, key];
      record[key] = item.normalize('NFC');
    } else if (item !== null && typeof item === 'object') {
      const bad = normaliseInPlace(item, [...path, key]);
      if (bad) return bad;
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
  const bad = normaliseInPlace(value, []);
  if (bad === null) return;
  const where = describePath(`/${bad.join('/')}`, part === 'body' ? request : undefined);
  throw loneSurrogate(part === 'body' ? where : `query.${where}`);
}

function loneSurrogate(field: string): Problem {
  return new Problem('validation', `${field}: contains a lone UTF-16 surrogate, which is not text`, [
    { field, message: 'a lone UTF-16 surrogate is not text' },
  ]);
}

export function installTextInput(app: FastifyInstance): void {
  app.addHook('preValidation', async (request) => {
    check(request, 'query');
    check(request, 'body');
  });
}
