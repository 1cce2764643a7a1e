/** Reading baselines: one by id (404 across organisations), a meter's versions a page at a time. */
import { verifyBaselineContent } from '../../store/baseline-content.js';
import type { BaselineRow } from '../../store/schema.js';
import { notFound } from '../../domain/errors.js';
import type { Executor } from '../context.js';
import { getMeterRow } from '../meters.js';
import { decodeCursor, PAGE_SIZES, pageOf, type PageInfo, type PageRequest } from '../paging.js';
import type { Baseline, BaselineSummary } from './types.js';
import { toBaselineSummary, viewOf } from './views.js';
import { baselineWeatherFills } from './fills.js';

/** The organisation's baseline, or a 404 (another organisation's id included). */
export async function getBaselineRow(db: Executor, organisationId: string, id: string): Promise<BaselineRow> {
  const row = await db
    .selectFrom('baselines')
    .selectAll()
    .where('id', '=', id)
    .where('organisation_id', '=', organisationId)
    .executeTakeFirst();
  if (!row) throw notFound('baseline', id);
  return row;
}

export async function getBaseline(
  db: Executor,
  organisationId: string,
  id: string,
): Promise<Baseline & { verified: boolean }> {
  const row = await getBaselineRow(db, organisationId, id);
  return { ...viewOf(row), weatherFills: await baselineWeatherFills(db, row), verified: verifyBaselineContent(row) };
}

/** The meter's baseline versions, newest first, a page at a time. */
export async function listBaselines(
  db: Executor,
  organisationId: string,
  meterId: string,
  request: PageRequest = { limit: PAGE_SIZES.records.default },
): Promise<{ baselines: BaselineSummary[] } & PageInfo> {
  const before = decodeCursor('baselines', request.cursor, 'n');
  const meter = await getMeterRow(db, organisationId, meterId);
  let q = db.selectFrom('baselines').selectAll().where('meter_id', '=', meter.id);
  if (before) q = q.where('version', '<', before[0] as number);
  const fetched = await q
    .orderBy('version', 'desc')
    .limit(request.limit + 1)
    .execute();
  const { rows, page } = pageOf(fetched, request, 'baselines', (row) => [row.version]);
  return { baselines: rows.map(toBaselineSummary), ...page };
}
