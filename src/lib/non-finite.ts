/**
 * JSON has no NaN or ±Infinity: a response or a report shows such a figure
 * as null (and says so in its notices). One helper for every layer.
 */

/** A deep copy with every non-finite number replaced by null, for JSON responses. */
export function nonFiniteToNull<T>(value: T): T {
  if (typeof value === 'number') return (Number.isFinite(value) ? value : null) as T;
  if (Array.isArray(value)) return value.map(nonFiniteToNull) as T;
  if (value !== null && typeof value === 'object') {
    const out: Record<string, unknown> = {};
    for (const [key, entry] of Object.entries(value)) out[key] = nonFiniteToNull(entry);
    return out as T;
  }
  return value;
}
