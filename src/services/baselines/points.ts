/**
 * The numbers behind a baseline's charts: every usable baseline period at its
 * mean temperature, and for every fitted shape its line, its expected use of
 * each period and each period's energy residual. The engine computes every
 * model value (predictPeriodPerDay, the fit's own residuals); this only
 * arranges them, so a client can draw all candidates side by side and show
 * the same numbers in a table.
 */
import {
  fitTemperatureForm,
  MODEL_NAMES,
  predictPeriodPerDay,
  type ModelName,
  type ShapeFit,
  type TemperatureUnit,
} from '../../engine/index.js';
import { fittedVertices } from '../../reports/svg/signature-points.js';
import { fromStoredJson } from '../../store/baseline-content.js';
import type { Executor } from '../context.js';
import { getMeterRow } from '../meters.js';
import { getBaselineRow } from './reads.js';
import type { BaselineInputs } from './types.js';
import { storedBaselinePeriods } from './views.js';

export interface BaselinePoint {
  start: string;
  end: string;
  days: number;
  quantity: number;
  usePerDay: number;
  meanTemp: number;
  coverage: number;
  estimated: boolean;
}

export interface CandidatePoints {
  model: ModelName;
  /** Vertices of the shape's line over the temperatures it saw, in temperature order. */
  line: { temp: number; usePerDay: number }[];
  /** The shape's expected use per day of each period, in the order of `periods`. */
  expectedPerDay: (number | null)[];
  /** Energy residual of each period (quantity − days × expected), in the order of `periods`. */
  residuals: (number | null)[];
}

export interface BaselinePoints {
  baselineId: string;
  meterId: string;
  meterName: string;
  useUnit: string;
  temperatureUnit: TemperatureUnit;
  temperatureForm: 'daily' | 'mean';
  chosen: ModelName;
  selected: ModelName;
  periods: BaselinePoint[];
  candidates: CandidatePoints[];
}

const finiteOrNull = (value: number): number | null => (Number.isFinite(value) ? value : null);

/** Every fitted shape's line, expected use and residuals over the baseline's usable periods (404 across organisations). */
export async function baselinePoints(
  db: Executor,
  organisationId: string,
  baselineId: string,
): Promise<BaselinePoints> {
  const row = await getBaselineRow(db, organisationId, baselineId);
  const meter = await getMeterRow(db, organisationId, row.meter_id);
  const inputs = fromStoredJson<Partial<BaselineInputs>>(row.inputs_json);
  const periods = storedBaselinePeriods(row) ?? [];
  const fits = fromStoredJson<Partial<Record<ModelName, ShapeFit>>>(row.fits_json);
  const candidates: CandidatePoints[] = [];
  for (const model of MODEL_NAMES) {
    const fit = fits[model];
    if (!fit) continue;
    const form = fitTemperatureForm(fit);
    const expected = periods.map((period) =>
      finiteOrNull(predictPeriodPerDay(fit.model, fit.changepoints, fit.rawCoefficients, period, form)),
    );
    candidates.push({
      model,
      line: fittedVertices(fit).map((point) => ({ temp: point.temp, usePerDay: point.usePerDay })),
      expectedPerDay: expected,
      residuals: periods.map((period, i) => {
        const value = expected[i];
        return value === null || value === undefined ? null : finiteOrNull(period.quantity - period.days * value);
      }),
    });
  }
  return {
    baselineId: row.id,
    meterId: meter.id,
    meterName: meter.name,
    useUnit: meter.unit,
    temperatureUnit: inputs.temperatureUnit ?? 'F',
    temperatureForm: row.temperature_form,
    chosen: row.chosen_model as ModelName,
    selected: row.selected_model as ModelName,
    periods: periods.map((p) => ({
      start: p.start,
      end: p.end,
      days: p.days,
      quantity: p.quantity,
      usePerDay: p.usePerDay,
      meanTemp: p.meanTemp,
      coverage: p.coverage,
      estimated: p.estimated,
    })),
    candidates,
  };
}
