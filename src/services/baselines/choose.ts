/** The engineer's choice of shape on a draft, and the rule that only a draft changes. */
import type { FitDocument, ModelName, ShapeFit } from '../../engine/index.js';
import { fromStoredJson } from '../../store/baseline-content.js';
import type { BaselineRow } from '../../store/schema.js';
import { DomainError } from '../../domain/errors.js';
import { audit, inTransaction, type ServiceContext } from '../context.js';
import { getBaselineRow } from './reads.js';
import type { Baseline } from './types.js';
import { toBaselineSummary, viewOf } from './views.js';
import { baselineWeatherFills } from './fills.js';

export function assertDraft(row: BaselineRow): void {
  if (row.status === 'draft') return;
  throw new DomainError(
    'frozen',
    `baseline ${row.id} is ${row.status} (content hash ${row.content_hash}); it cannot be changed: fit a new baseline version and freeze it with a supersedeReason`,
    undefined,
    { baselineId: row.id, baselineStatus: row.status },
  );
}

/** The engineer's choice of shape on a draft: any fitted shape, its verdict recorded beside it. */
export async function chooseModel(
  ctx: ServiceContext,
  baselineId: string,
  input: { model: ModelName; reason: string },
): Promise<Baseline> {
  return inTransaction(ctx, async (trx) => {
    const row = await getBaselineRow(trx, ctx.principal.organisationId, baselineId);
    assertDraft(row);
    const document = fromStoredJson<FitDocument>(row.document_json);
    const candidate = document.candidates.find((c) => c.model === input.model);
    const fits = fromStoredJson<Partial<Record<ModelName, ShapeFit>>>(row.fits_json);
    if (!candidate || candidate.verdict === 'not-fitted' || !fits[input.model]) {
      const fitted = document.candidates.filter((c) => c.verdict !== 'not-fitted').map((c) => c.model);
      const why = candidate ? ` (${candidate.reasons.join('; ')})` : '';
      throw new DomainError(
        'unprocessable',
        `model: the ${input.model} shape was not fitted to baseline ${row.id}${why}; fitted shapes: ${fitted.join(', ')}`,
        [{ field: 'model', message: `${input.model} was not fitted` }],
      );
    }
    const updated: BaselineRow = { ...row, chosen_model: input.model, choice_reason: input.reason };
    await trx
      .updateTable('baselines')
      .set({ chosen_model: updated.chosen_model, choice_reason: updated.choice_reason })
      .where('id', '=', row.id)
      .where('status', '=', 'draft')
      .execute();
    await audit(trx, ctx, {
      action: 'choose',
      entityType: 'baseline',
      entityId: row.id,
      before: toBaselineSummary(row),
      after: toBaselineSummary(updated),
    });
    return { ...viewOf(updated), weatherFills: await baselineWeatherFills(trx, updated) };
  });
}
