/**
 * The baseline's energy signature: the service loads and aligns its periods
 * (the reporting ones once frozen, net of their adjustments); the caller
 * draws the chart with src/reports/svg/baseline-signature.ts.
 */
import { adjustmentsForPeriod, alignPeriods, type ModelName, type Period, type ShapeFit } from '../../engine/index.js';
import { fromStoredJson } from '../../store/baseline-content.js';
import { DomainError } from '../../domain/errors.js';
import type { BaselineSignatureInput } from '../../reports/baseline-signature-input.js';
import type { Executor } from '../context.js';
import { getMeterRow } from '../meters.js';
import { toEngineAdjustment } from '../adjustments.js';
import { loadReadings, loadWeatherFor } from '../meter-data.js';
import { getBaselineRow } from './reads.js';
import type { BaselineFitOptions, BaselineInputs } from './types.js';

/** What the baseline's energy signature is drawn from; reporting periods are added once it has been frozen. */
export async function baselineSignatureData(
  db: Executor,
  organisationId: string,
  baselineId: string,
): Promise<BaselineSignatureInput> {
  const row = await getBaselineRow(db, organisationId, baselineId);
  const meter = await getMeterRow(db, organisationId, row.meter_id);
  const inputs = fromStoredJson<BaselineInputs>(row.inputs_json);
  const options = fromStoredJson<BaselineFitOptions>(row.options_json);
  const fit = fromStoredJson<Partial<Record<ModelName, ShapeFit>>>(row.fits_json)[row.chosen_model as ModelName];
  if (!fit)
    throw new DomainError('unprocessable', `baseline ${row.id} holds no fit of its chosen shape ${row.chosen_model}`);
  const alignment = { minCoverage: options.minCoverage };
  const baseline = alignPeriods(inputs.readings, inputs.weather, alignment).periods;

  let reporting: Period[] = [];
  if (row.status !== 'draft') {
    const readings = await loadReadings(db, meter.id, { startOnOrAfter: row.period_end });
    const weather = await loadWeatherFor(db, meter.weather_station_id, readings);
    reporting = alignPeriods(readings, weather, alignment).periods;
  }
  // Reporting periods are drawn net of their non-routine adjustments, as savings count them.
  const adjustments =
    reporting.length === 0
      ? []
      : (
          await db
            .selectFrom('adjustments')
            .selectAll()
            .where('meter_id', '=', meter.id)
            .where('withdrawn_at', 'is', null)
            .execute()
        ).map(toEngineAdjustment);
  const charted = reporting.map((p) => ({
    ...p,
    adjustment: adjustments.length > 0 ? adjustmentsForPeriod(adjustments, p.start, p.end) : 0,
  }));
  return {
    meterName: meter.name,
    model: row.chosen_model,
    version: row.version,
    status: row.status,
    baselineStart: row.period_start,
    baselineEnd: row.period_end,
    temperatureUnit: inputs.temperatureUnit,
    useUnit: meter.unit,
    fit,
    baselinePeriods: baseline,
    reportingPeriods: charted,
  };
}
