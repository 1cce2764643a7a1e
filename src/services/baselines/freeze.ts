/**
 * Freezing a draft under its content hash: the short-baseline rule and its
 * override, and superseding the meter's frozen baseline with a reason.
 */
import { storeFrozenModel } from '../frozen-models.js';
import { baselineSufficiency } from '../../engine/index.js';
import { baselineContentHash } from '../../store/baseline-content.js';
import { bumpMeterVersions } from '../../store/data-versions.js';
import type { BaselineRow } from '../../store/schema.js';
import { DomainError } from '../../domain/errors.js';
import { audit, inTransaction, type ServiceContext } from '../context.js';
import { assertDraft } from './choose.js';
import { getBaselineRow } from './reads.js';
import type { Baseline, FreezeInput } from './types.js';
import { storedBaselinePeriods, toBaselineSummary, viewOf } from './views.js';
import { baselineWeatherFills } from './fills.js';

/**
 * A draft shorter than a full cycle of seasons is refused (422, the reasons
 * in words) unless the freeze carries overrides.shortBaseline with a reason;
 * an override with nothing to override is refused too (400), so a recorded
 * override always meant something.
 */
function checkSufficiency(row: BaselineRow, input: FreezeInput): void {
  const periods = storedBaselinePeriods(row);
  if (periods === null) return;
  const sufficiency = baselineSufficiency(periods);
  const override = input.overrides?.shortBaseline;
  if (!sufficiency.sufficient && override === undefined) {
    throw new DomainError(
      'unprocessable',
      `baseline ${row.id} is too short to freeze: ${sufficiency.reasons.join('; ')}. Fit a window that covers a full cycle of seasons, or freeze with overrides.shortBaseline.reason saying why this baseline may be projected from (the reason is kept with the baseline and shown on every document that uses it)`,
      [
        {
          field: 'overrides.shortBaseline.reason',
          message: `required to freeze a baseline shorter than a full cycle of seasons (${sufficiency.periods} periods, ${sufficiency.days} days)`,
        },
      ],
      { sufficiency },
    );
  }
  if (sufficiency.sufficient && override !== undefined) {
    throw new DomainError(
      'invalid',
      `overrides.shortBaseline: baseline ${row.id} covers a full cycle of seasons (${sufficiency.periods} periods, ${sufficiency.days} days); there is nothing to override: leave it out`,
      [{ field: 'overrides.shortBaseline', message: 'nothing to override' }],
    );
  }
}

/**
 * Freeze a draft. When the meter already has a frozen baseline, a reason is
 * required and that baseline becomes superseded in the same transaction; its
 * content and hash are kept as they were. Overrides given here (a short
 * baseline, projection beyond the extrapolation limit) are kept with the
 * baseline under its content hash.
 */
export async function freezeBaseline(ctx: ServiceContext, baselineId: string, input: FreezeInput): Promise<Baseline> {
  return inTransaction(ctx, async (trx) => {
    const row = await getBaselineRow(trx, ctx.principal.organisationId, baselineId);
    assertDraft(row);
    const current = await trx
      .selectFrom('baselines')
      .selectAll()
      .where('meter_id', '=', row.meter_id)
      .where('status', '=', 'frozen')
      .executeTakeFirst();
    if (current && input.supersedeReason === undefined) {
      throw new DomainError(
        'conflict',
        `supersedeReason: meter ${row.meter_id} already has frozen baseline ${current.id} (version ${current.version}, frozen ${current.frozen_at}); send supersedeReason to supersede it`,
        [{ field: 'supersedeReason', message: `required to supersede baseline ${current.id}` }],
        { currentBaselineId: current.id },
      );
    }
    if (!current && input.supersedeReason !== undefined) {
      throw new DomainError(
        'invalid',
        `supersedeReason: meter ${row.meter_id} has no frozen baseline to supersede; leave it out`,
        [{ field: 'supersedeReason', message: 'nothing to supersede' }],
      );
    }
    checkSufficiency(row, input);
    const frozen: BaselineRow = {
      ...row,
      status: 'frozen',
      note: input.note,
      frozen_at: ctx.now,
      frozen_by: ctx.principal.keyId,
      supersedes_id: current?.id ?? null,
      supersede_reason: input.supersedeReason ?? null,
      short_baseline_override: input.overrides?.shortBaseline?.reason ?? null,
      extrapolation_override: input.overrides?.extrapolation?.reason ?? null,
    };
    frozen.content_hash = baselineContentHash(frozen);
    // Freezing (and superseding) changes which model the meter's savings project with.
    await bumpMeterVersions(trx, [row.meter_id]);

    if (current) {
      const superseded: BaselineRow = { ...current, status: 'superseded' };
      await trx
        .updateTable('baselines')
        .set({ status: 'superseded' })
        .where('id', '=', current.id)
        .where('status', '=', 'frozen')
        .execute();
      await audit(trx, ctx, {
        action: 'supersede',
        entityType: 'baseline',
        entityId: current.id,
        before: toBaselineSummary(current),
        after: { ...toBaselineSummary(superseded), supersededBy: frozen.id, supersedeReason: input.supersedeReason },
      });
    }
    await trx
      .updateTable('baselines')
      .set({
        status: frozen.status,
        note: frozen.note,
        frozen_at: frozen.frozen_at,
        frozen_by: frozen.frozen_by,
        supersedes_id: frozen.supersedes_id,
        supersede_reason: frozen.supersede_reason,
        short_baseline_override: frozen.short_baseline_override,
        extrapolation_override: frozen.extrapolation_override,
        content_hash: frozen.content_hash,
      })
      .where('id', '=', row.id)
      .where('status', '=', 'draft')
      .execute();
    // The compact model reports project with, derived now from the content just hashed.
    await storeFrozenModel(trx, frozen, frozen.content_hash);
    await audit(trx, ctx, {
      action: 'freeze',
      entityType: 'baseline',
      entityId: row.id,
      before: toBaselineSummary(row),
      after: toBaselineSummary(frozen),
    });
    return { ...viewOf(frozen), weatherFills: await baselineWeatherFills(trx, frozen) };
  });
}
