/**
 * A meter's newest baseline version, addressed by the meter: a client that
 * shows "the meter's baseline" (the workbench's bench) reads it and its
 * points in the same round as the meter, without first reading the history
 * to learn the id. 404 when the meter has none yet (or is another
 * organisation's).
 */
import { DomainError } from '../../domain/errors.js';
import type { Executor } from '../context.js';
import { getMeterRow } from '../meters.js';
import { baselinePoints, type BaselinePoints } from './points.js';
import { getBaseline } from './reads.js';
import type { Baseline } from './types.js';

async function newestBaselineId(db: Executor, organisationId: string, meterId: string): Promise<string> {
  const meter = await getMeterRow(db, organisationId, meterId);
  const newest = await db
    .selectFrom('baselines')
    .select('id')
    .where('meter_id', '=', meter.id)
    .orderBy('version', 'desc')
    .limit(1)
    .executeTakeFirst();
  if (!newest) throw new DomainError('not-found', `meter ${meter.id} has no baseline yet: fit one first`);
  return newest.id;
}

/** The meter's newest baseline version (draft, frozen or superseded), as GET /v1/baselines/{id} shows it. */
export async function getNewestBaseline(
  db: Executor,
  organisationId: string,
  meterId: string,
): Promise<Baseline & { verified: boolean }> {
  return getBaseline(db, organisationId, await newestBaselineId(db, organisationId, meterId));
}

/** The points of the meter's newest baseline version, as GET /v1/baselines/{id}/points gives them. */
export async function newestBaselinePoints(
  db: Executor,
  organisationId: string,
  meterId: string,
): Promise<BaselinePoints> {
  return baselinePoints(db, organisationId, await newestBaselineId(db, organisationId, meterId));
}
