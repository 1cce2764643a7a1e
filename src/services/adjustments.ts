/**
 * Non-routine adjustments: documented changes the weather model cannot see
 * (added floor area, a new data hall, a closed wing). Each covers reporting
 * days of one meter, as a total or a rate per day, in the meter's unit; a
 * positive figure adds to the adjusted baseline. They never overlap on one
 * meter (one figure per day keeps every report unambiguous) and never reach
 * back into the frozen baseline's window. One recorded in error is
 * withdrawn, with a reason: it then counts nowhere but stays on record.
 */
import {
  type InvalidAdjustmentError,
  adjustmentPerDay,
  daysBetween,
  findOverlappingAdjustment,
  type NonRoutineAdjustment,
} from '../engine/index.js';
import { newId } from '../store/ids.js';
import type { Selectable } from 'kysely';
import type { AdjustmentsTable } from '../store/schema.js';
import { notFound, DomainError } from '../domain/errors.js';
import { audit, inTransaction, type Executor, type ServiceContext } from './context.js';
import { getMeterRow } from './meters.js';
import { bumpMeterVersions } from '../store/data-versions.js';
import { decodeCursor, PAGE_SIZES, pageOf, type PageInfo, type PageRequest } from './paging.js';

export interface AdjustmentInput {
  start: string;
  end: string;
  quantity?: number;
  perDay?: number;
  reason: string;
  /** The engineer's standard uncertainty (one standard deviation) of the total, in the meter's unit. */
  uncertainty?: number;
}

export interface Adjustment {
  id: string;
  meterId: string;
  start: string;
  end: string;
  quantity: number | null;
  perDay: number;
  reason: string;
  /** The engineer's standard uncertainty (one standard deviation) of the adjustment's total over [start, end), in the meter's unit; null when none was stated. */
  uncertainty: number | null;
  recordedAt: string;
  recordedBy: string;
  /** Null while the adjustment counts. */
  withdrawn: { at: string; by: string; reason: string } | null;
}

type AdjustmentRow = Selectable<AdjustmentsTable>;

export function toAdjustment(row: AdjustmentRow): Adjustment {
  return {
    id: row.id,
    meterId: row.meter_id,
    start: row.period_start,
    end: row.period_end,
    quantity: row.quantity,
    perDay: adjustmentPerDay(toEngineAdjustment(row)),
    reason: row.reason,
    uncertainty: row.uncertainty,
    recordedAt: row.created_at,
    recordedBy: row.created_by,
    withdrawn:
      row.withdrawn_at === null
        ? null
        : { at: row.withdrawn_at, by: row.withdrawn_by ?? '', reason: row.withdraw_reason ?? '' },
  };
}

export function toEngineAdjustment(row: AdjustmentRow): NonRoutineAdjustment {
  return {
    id: row.id,
    start: row.period_start,
    end: row.period_end,
    quantity: row.quantity,
    perDay: row.per_day,
    reason: row.reason,
    uncertainty: row.uncertainty,
  };
}

export async function createAdjustment(
  ctx: ServiceContext,
  meterId: string,
  input: AdjustmentInput,
): Promise<Adjustment> {
  if (!(input.end > input.start))
    throw new DomainError('invalid', 'end: must be after start', [{ field: 'end', message: 'must be after start' }]);
  if ((input.quantity === undefined) === (input.perDay === undefined)) {
    throw new DomainError(
      'invalid',
      'quantity: give either quantity (a total over the days) or perDay, not both and not neither',
      [{ field: 'quantity', message: 'give quantity or perDay' }],
    );
  }
  const organisationId = ctx.principal.organisationId;
  return inTransaction(ctx, async (trx) => {
    const meter = await getMeterRow(trx, organisationId, meterId);
    const baseline = await trx
      .selectFrom('baselines')
      .select(['id', 'period_end'])
      .where('meter_id', '=', meter.id)
      .where('status', '=', 'frozen')
      .executeTakeFirst();
    if (!baseline) {
      throw new DomainError(
        'unprocessable',
        `meter ${meterId} has no frozen baseline: non-routine adjustments apply to reporting periods, after a baseline is frozen`,
      );
    }
    if (input.start < baseline.period_end) {
      throw new DomainError(
        'unprocessable',
        `start: ${input.start} lies inside the frozen baseline's window (it ends ${baseline.period_end}); adjustments apply to reporting days only`,
        [{ field: 'start', message: `must be on or after ${baseline.period_end}` }],
      );
    }
    const existing = await trx
      .selectFrom('adjustments')
      .selectAll()
      .where('meter_id', '=', meter.id)
      .where('withdrawn_at', 'is', null)
      .execute();
    const clash = findOverlappingAdjustment(
      existing.map((row) => ({ start: row.period_start, end: row.period_end, id: row.id })),
      input,
    );
    if (clash) {
      throw new DomainError(
        'conflict',
        `start: ${input.start}..${input.end} overlaps adjustment ${clash.id} (${clash.start}..${clash.end}) of this meter; one adjustment per day keeps reports unambiguous: combine them or shorten one`,
        [{ field: 'start', message: `overlaps adjustment ${clash.id}` }],
      );
    }
    const row: AdjustmentRow = {
      id: newId('adj'),
      organisation_id: organisationId,
      meter_id: meter.id,
      period_start: input.start,
      period_end: input.end,
      quantity: input.quantity ?? null,
      per_day: input.perDay ?? null,
      reason: input.reason,
      created_at: ctx.now,
      created_by: ctx.principal.keyId,
      withdrawn_at: null,
      withdrawn_by: null,
      withdraw_reason: null,
      uncertainty: input.uncertainty ?? null,
    };
    await trx.insertInto('adjustments').values(row).execute();
    await bumpMeterVersions(trx, [row.meter_id]);
    const adjustment = toAdjustment(row);
    await audit(trx, ctx, {
      action: 'create',
      entityType: 'adjustment',
      entityId: row.id,
      after: { ...adjustment, days: daysBetween(row.period_start, row.period_end) },
    });
    return adjustment;
  });
}

/** Withdraw an adjustment recorded in error: it stops counting in savings and reports; the row and the audit trail keep it. */
export async function withdrawAdjustment(
  ctx: ServiceContext,
  id: string,
  input: { reason: string },
): Promise<Adjustment> {
  return inTransaction(ctx, async (trx) => {
    const row = await trx
      .selectFrom('adjustments')
      .selectAll()
      .where('id', '=', id)
      .where('organisation_id', '=', ctx.principal.organisationId)
      .executeTakeFirst();
    if (!row) throw notFound('adjustment', id);
    if (row.withdrawn_at !== null)
      throw new DomainError('conflict', `adjustment ${id} was already withdrawn on ${row.withdrawn_at}`);
    const update = { withdrawn_at: ctx.now, withdrawn_by: ctx.principal.keyId, withdraw_reason: input.reason };
    await trx.updateTable('adjustments').set(update).where('id', '=', id).execute();
    await bumpMeterVersions(trx, [row.meter_id]);
    const after = toAdjustment({ ...row, ...update });
    await audit(trx, ctx, {
      action: 'withdraw',
      entityType: 'adjustment',
      entityId: id,
      before: toAdjustment(row),
      after,
    });
    return after;
  });
}

/** The meter's adjustments (withdrawn ones too), by start, a page at a time. */
export async function listAdjustments(
  db: Executor,
  organisationId: string,
  meterId: string,
  request: PageRequest = { limit: PAGE_SIZES.records.default },
): Promise<{ meterId: string; unit: string; adjustments: Adjustment[] } & PageInfo> {
  const after = decodeCursor('adjustments', request.cursor, 'ss');
  const meter = await getMeterRow(db, organisationId, meterId);
  let q = db.selectFrom('adjustments').selectAll().where('meter_id', '=', meter.id);
  if (after) {
    const [start, id] = after as [string, string];
    q = q.where((eb) =>
      eb.or([eb('period_start', '>', start), eb.and([eb('period_start', '=', start), eb('id', '>', id)])]),
    );
  }
  const fetched = await q
    .orderBy('period_start')
    .orderBy('id')
    .limit(request.limit + 1)
    .execute();
  const { rows, page } = pageOf(fetched, request, 'adjustments', (row) => [row.period_start, row.id]);
  return { meterId: meter.id, unit: meter.unit, ...page, adjustments: rows.map(toAdjustment) };
}

/**
 * A stored adjustment the engine cannot apply (one brought in before a rule
 * was checked, or edited in the database): unprocessable, naming it.
 */
export function adjustmentProblem(error: InvalidAdjustmentError): DomainError {
  return new DomainError(
    'unprocessable',
    `${error.message}; withdraw it (POST /v1/adjustments/${error.adjustmentId}/withdraw) and record it again`,
    [{ field: `adjustment ${error.adjustmentId}.${error.field}`, message: error.reason }],
  );
}
