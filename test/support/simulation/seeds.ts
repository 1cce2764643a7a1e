/**
 * Seeds for simulated meters. Every meter of a simulation gets its own
 * seed, derived from a few whole numbers (experiment, group, meter index),
 * so adding a meter or a group never shifts the numbers any other meter
 * sees, and neighbouring meters do not start from neighbouring states of
 * the random source.
 */

/** A 32-bit seed mixed from whole numbers (the murmur3 finaliser over a running combination). */
export function deriveSeed(...parts: readonly number[]): number {
  let hash = 0x9e3779b9;
  for (const part of parts) {
    if (!Number.isInteger(part)) throw new RangeError(`seed parts must be whole numbers, got ${part}`);
    hash = Math.imul(hash ^ (part >>> 0), 0x85ebca6b) >>> 0;
    hash = mix(hash + 0x27d4eb2f);
  }
  return hash;
}

/** The murmur3 32-bit finaliser: every input bit moves every output bit. */
function mix(value: number): number {
  let h = value >>> 0;
  h ^= h >>> 16;
  h = Math.imul(h, 0x85ebca6b);
  h ^= h >>> 13;
  h = Math.imul(h, 0xc2b2ae35);
  h ^= h >>> 16;
  return h >>> 0;
}
