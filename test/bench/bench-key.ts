/**
 * A bootstrap key for a benchmark's service, drawn at random each run: the
 * service refuses a secret that looks chosen (src/config.ts,
 * secretLooksRandom), so a fixed patterned key no longer starts it.
 */
import { randomInt } from 'node:crypto';

const ALPHABET = 'ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789';

/** `mvl_<id>_<40 random letters or digits>`; `id` is 8 letters or digits naming the benchmark. */
export function benchBootstrapKey(id: string): string {
  if (!/^[A-Za-z0-9]{8}$/.test(id)) throw new RangeError(`a key id is 8 letters or digits, got ${JSON.stringify(id)}`);
  let secret = '';
  for (let i = 0; i < 40; i++) secret += ALPHABET[randomInt(ALPHABET.length)];
  return `mvl_${id}_${secret}`;
}
