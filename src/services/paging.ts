/**
 * Lists answer in pages: keyset paging on each list's own order, so a page
 * costs an index range however deep it lies, and rows written meanwhile
 * neither repeat nor vanish between pages. The cursor is opaque to clients:
 * the list's name and the last row's key, as base64url JSON.
 */
import type { Expression, ExpressionBuilder, SelectQueryBuilder, SqlBool } from 'kysely';
import { DomainError } from '../domain/errors.js';

export type CursorKey = readonly (string | number)[];

/** What a list request asks for: how many rows, and where the last page ended. */
export interface PageRequest {
  limit: number;
  cursor?: string | undefined;
}

/** What every page adds to its list: the page size used and the cursor of the next page (null on the last). */
export interface PageInfo {
  limit: number;
  nextCursor: string | null;
}

/** Page sizes per kind of list: stated in the OpenAPI document (http/schemas/common.ts). */
export const PAGE_SIZES = {
  /** Readings and weather observations: a page is a few years of daily data. */
  series: { default: 1000, max: 10_000 },
  /** Facilities, meters, stations, keys, baselines, adjustments, audit rows. */
  records: { default: 100, max: 1000 },
} as const;

export function encodeCursor(list: string, key: CursorKey): string {
  return Buffer.from(JSON.stringify([list, ...key])).toString('base64url');
}

/**
 * The key a cursor carries, checked to belong to `list` and to have the
 * key's types (`shape`: 's' text, 'n' integer); a bad cursor is a 400 naming
 * query.cursor.
 */
export function decodeCursor(list: string, cursor: string | undefined, shape: string): CursorKey | undefined {
  if (cursor === undefined) return undefined;
  let parsed: unknown;
  try {
    parsed = JSON.parse(Buffer.from(cursor, 'base64url').toString('utf8'));
  } catch {
    parsed = undefined;
  }
  const valid =
    Array.isArray(parsed) &&
    parsed.length === shape.length + 1 &&
    parsed[0] === list &&
    [...shape].every((kind, i) =>
      kind === 'n' ? Number.isSafeInteger(parsed[i + 1]) : typeof parsed[i + 1] === 'string',
    );
  if (!valid) {
    throw new DomainError(
      'invalid',
      `query.cursor: not a cursor of this list; pass the nextCursor of the previous page unchanged`,
      [{ field: 'query.cursor', message: 'not a cursor of this list' }],
    );
  }
  return (parsed as unknown[]).slice(1) as CursorKey;
}

/**
 * A page from rows fetched with limit + 1 (one more than asked tells
 * whether another page follows).
 */
export function pageOf<T>(
  rows: readonly T[],
  request: PageRequest,
  list: string,
  keyOf: (row: T) => CursorKey,
): { rows: T[]; page: PageInfo } {
  const page = rows.slice(0, request.limit);
  const last = page[page.length - 1];
  const more = rows.length > request.limit && last !== undefined;
  return { rows: page, page: { limit: request.limit, nextCursor: more ? encodeCursor(list, keyOf(last)) : null } };
}

/**
 * The keyset condition for lists in (created_at, id) order: rows after the
 * cursor's key, or every row when there is no cursor.
 */
export function afterCreated<EB extends ExpressionBuilder<any, any>>(
  eb: EB,
  after: CursorKey | undefined,
): Expression<SqlBool> {
  if (!after) return eb.lit(true);
  const [createdAt, id] = after as [string, string];
  return eb.or([eb('created_at', '>', createdAt), eb.and([eb('created_at', '=', createdAt), eb('id', '>', id)])]);
}

/**
 * One page, oldest first, of a list ordered by (created_at, id): the keyset
 * condition, the order, one row more than the page to know whether another
 * follows, and the next cursor. `query` selects the list's rows (its table
 * and filter); `list` names the list in its cursors.
 */
export async function oldestFirstPage<Row extends { created_at: string; id: string }>(
  query: SelectQueryBuilder<any, any, Row>,
  request: PageRequest,
  list: string,
): Promise<{ rows: Row[]; page: PageInfo }> {
  const after = decodeCursor(list, request.cursor, 'ss');
  const fetched = await query
    .where((eb) => afterCreated(eb, after))
    .orderBy('created_at')
    .orderBy('id')
    .limit(request.limit + 1)
    .execute();
  return pageOf(fetched, request, list, (row) => [row.created_at, row.id]);
}
