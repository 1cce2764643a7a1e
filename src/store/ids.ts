/** Resource ids: a short type prefix and a random UUID, so an id says what it names. */
import { randomUUID } from 'node:crypto';

export type IdKind = 'org' | 'fac' | 'mtr' | 'wst' | 'bsl' | 'adj' | 'stm' | 'var';

export function newId(kind: IdKind): string {
  return `${kind}_${randomUUID()}`;
}
