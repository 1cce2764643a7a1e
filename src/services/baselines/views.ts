/**
 * A stored baseline row as the API shows it: its summary, the warnings on
 * its choice and length, its overrides, and the fit document with its form.
 */
import {
  alignPeriods,
  baselineSufficiency,
  type BaselineSufficiency,
  type FitDocument,
  type ModelName,
  type Period,
} from '../../engine/index.js';
import { forResponse, fromStoredJson } from '../../store/baseline-content.js';
import type { BaselineRow } from '../../store/schema.js';
import type { Baseline, BaselineFitOptions, BaselineInputs, BaselineOverrides, BaselineSummary } from './types.js';

function choiceWarnings(row: BaselineRow, document: FitDocument, sufficiency: BaselineSufficiency | null): string[] {
  const warnings: string[] = [];
  if (sufficiency && !sufficiency.sufficient) {
    const how =
      row.status === 'draft'
        ? 'it is too short to freeze without overrides.shortBaseline.reason'
        : row.short_baseline_override !== null
          ? 'it was frozen with a short-baseline override'
          : 'it was frozen before the rule was enforced';
    warnings.push(`the baseline does not cover a full cycle of seasons (${sufficiency.reasons.join('; ')}): ${how}`);
  }
  if (row.chosen_model !== row.selected_model) {
    warnings.push(
      `the chosen shape ${row.chosen_model} is an engineer's choice; the engine selected ${row.selected_model}`,
    );
  }
  const chosen = document.candidates.find((c) => c.model === row.chosen_model);
  if (chosen?.verdict === 'rejected') {
    warnings.push(`the chosen shape ${row.chosen_model} was rejected by screening: ${chosen.reasons.join('; ')}`);
  }
  return warnings;
}

/** The baseline's own usable periods, re-aligned from its stored inputs (null for a row without inputs). */
export function storedBaselinePeriods(
  row: Pick<BaselineRow, 'inputs_json' | 'options_json' | 'document_json'>,
): Period[] | null {
  const inputs = fromStoredJson<Partial<BaselineInputs>>(row.inputs_json);
  if (!Array.isArray(inputs.readings) || !Array.isArray(inputs.weather)) return null;
  const options = fromStoredJson<BaselineFitOptions>(row.options_json);
  const document = fromStoredJson<Partial<FitDocument>>(row.document_json);
  return alignPeriods(inputs.readings, inputs.weather, {
    minCoverage: options.minCoverage ?? document.settings?.minCoverage,
    variableSeries: inputs.variables ?? [],
  }).periods;
}

export function overridesOf(
  row: Pick<BaselineRow, 'short_baseline_override' | 'extrapolation_override'>,
): BaselineOverrides {
  return {
    shortBaseline: row.short_baseline_override === null ? null : { reason: row.short_baseline_override },
    extrapolation: row.extrapolation_override === null ? null : { reason: row.extrapolation_override },
  };
}

function summaryOf(row: BaselineRow, document: FitDocument): BaselineSummary {
  const periods = storedBaselinePeriods(row);
  const sufficiency = periods === null ? null : baselineSufficiency(periods);
  return {
    id: row.id,
    meterId: row.meter_id,
    version: row.version,
    status: row.status,
    start: row.period_start,
    end: row.period_end,
    options: JSON.parse(row.options_json) as BaselineFitOptions,
    temperatureForm: row.temperature_form,
    sufficiency,
    overrides: overridesOf(row),
    selected: row.selected_model as ModelName,
    chosen: row.chosen_model as ModelName,
    choiceReason: row.choice_reason,
    warnings: choiceWarnings(row, document, sufficiency),
    contentHash: row.content_hash,
    note: row.note,
    frozenAt: row.frozen_at,
    frozenBy: row.frozen_by,
    supersedes: row.supersedes_id,
    supersedeReason: row.supersede_reason,
    createdAt: row.created_at,
    createdBy: row.created_by,
    exclusions: document.exclusions ?? [],
  };
}

/**
 * The stored fit document as the API shows it. Documents stored before the
 * day-resolved form existed do not name their form: they are mean-form fits.
 */
function fitDocumentOf(row: BaselineRow): FitDocument {
  const document = forResponse<FitDocument>(row.document_json);
  const form = document.temperatureForm ?? 'mean';
  return {
    ...document,
    temperatureForm: form,
    settings: { ...document.settings, temperatureForm: document.settings.temperatureForm ?? form },
  };
}

/** The row as the API shows it, without its weather fills (fills.ts reads those from the station's record). */
export function viewOf(row: BaselineRow): Omit<Baseline, 'weatherFills'> {
  const document = fitDocumentOf(row);
  return { ...summaryOf(row, document), fit: document };
}

export function toBaselineSummary(row: BaselineRow): BaselineSummary {
  return summaryOf(row, fitDocumentOf(row));
}
