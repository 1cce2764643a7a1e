/**
 * Contract rates of a meter: an effective-dated schedule (currency per unit
 * of the meter) with an optional yearly escalation, replaced whole by each
 * PUT. A schedule has no gaps and no overlaps; days before its first entry
 * or after a closed last entry have no rate, and reports flag them rather
 * than assume one.
 */
import { checkRateBounds, checkRateSchedule, type RateEntry } from '../engine/index.js';
import { fieldErrors } from '../domain/errors.js';
import { audit, inTransaction, type Executor, type ServiceContext } from './context.js';
import { getMeterRow } from './meters.js';
import { bumpMeterVersions } from '../store/data-versions.js';

export interface RateInput {
  from: string;
  to?: string | null;
  price: number;
  escalation?: number;
}

export interface RateSchedule {
  meterId: string;
  unit: string;
  /** ISO 4217 code; null while the meter has no rates. */
  currency: string | null;
  rates: RateEntry[];
}

export async function putRates(
  ctx: ServiceContext,
  meterId: string,
  input: { currency: string; rates: readonly RateInput[] },
): Promise<RateSchedule> {
  const rates: RateEntry[] = input.rates.map((r) => ({
    from: r.from,
    to: r.to ?? null,
    price: r.price,
    escalation: r.escalation ?? 0,
  }));
  const problems = [...checkRateSchedule(rates), ...checkRateBounds(rates)].sort((a, b) => a.index - b.index);
  if (problems.length > 0) {
    const errors = problems.map((p) => ({ field: `rates[${p.index}].${p.field}`, message: p.message }));
    throw fieldErrors('invalid', errors);
  }
  const organisationId = ctx.principal.organisationId;
  return inTransaction(ctx, async (trx) => {
    const meter = await getMeterRow(trx, organisationId, meterId);
    const before = await loadSchedule(trx, meter.id, meter.unit);
    await trx.deleteFrom('rates').where('meter_id', '=', meter.id).execute();
    await bumpMeterVersions(trx, [meter.id]);
    if (rates.length > 0) {
      await trx
        .insertInto('rates')
        .values(
          rates.map((r) => ({
            meter_id: meter.id,
            effective_from: r.from,
            effective_to: r.to,
            price: r.price,
            escalation: r.escalation,
            currency: input.currency,
            updated_at: ctx.now,
          })),
        )
        .execute();
    }
    const after: RateSchedule = {
      meterId: meter.id,
      unit: meter.unit,
      currency: rates.length > 0 ? input.currency : null,
      rates,
    };
    await audit(trx, ctx, {
      action: 'put-rates',
      entityType: 'meter',
      entityId: meter.id,
      before: { currency: before.currency, rates: before.rates },
      after: { currency: after.currency, rates },
    });
    return after;
  });
}

export async function getRates(db: Executor, organisationId: string, meterId: string): Promise<RateSchedule> {
  const meter = await getMeterRow(db, organisationId, meterId);
  return loadSchedule(db, meter.id, meter.unit);
}

export async function loadSchedule(db: Executor, meterId: string, unit: string): Promise<RateSchedule> {
  const rows = await db
    .selectFrom('rates')
    .selectAll()
    .where('meter_id', '=', meterId)
    .orderBy('effective_from')
    .execute();
  return scheduleOfRows(meterId, unit, rows);
}

/** A meter's schedule from its rate rows in effective_from order. */
export function scheduleOfRows(
  meterId: string,
  unit: string,
  rows: readonly {
    effective_from: string;
    effective_to: string | null;
    price: number;
    escalation: number;
    currency: string;
  }[],
): RateSchedule {
  return {
    meterId,
    unit,
    currency: rows[0]?.currency ?? null,
    rates: rows.map((row) => ({
      from: row.effective_from,
      to: row.effective_to,
      price: row.price,
      escalation: row.escalation,
    })),
  };
}
