/**
 * Canonical JSON: object keys sorted, no whitespace, so that equal content
 * always gives equal bytes and equal hashes (audit chain, baseline content
 * hashes, idempotency request fingerprints). Non-finite numbers become null,
 * as JSON.stringify does.
 */
import { createHash } from 'node:crypto';

export function canonicalJson(value: unknown): string {
  return JSON.stringify(sortKeys(value));
}

function sortKeys(value: unknown): unknown {
  if (Array.isArray(value)) return value.map(sortKeys);
  if (value !== null && typeof value === 'object' && !(value instanceof Date)) {
    const out: Record<string, unknown> = {};
    for (const key of Object.keys(value).sort()) {
      const entry = (value as Record<string, unknown>)[key];
      if (entry !== undefined) out[key] = sortKeys(entry);
    }
    return out;
  }
  return value;
}

/** Hex SHA-256 of a string. */
export function sha256Hex(text: string): string {
  return createHash('sha256').update(text).digest('hex');
}
