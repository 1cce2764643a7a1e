/**
 * The independent variables' columns of a model: use per day =
 * shape(T) + Σ βk·zk, the zk appended to the shape's design row in the
 * order the fit names them. A model fitted without variables reads none, so
 * every fit stored before variables existed predicts as it always did.
 */
import type { ModelName, Period, TemperatureForm } from '../types.js';
import { periodDesignRow, type Changepoints, type PeriodWeather } from './shape-model.js';
import { MissingVariableValuesError } from '../errors.js';

/** What a prediction needs of a period: its weather and, for a model with variables, their values. */
export type PeriodInputs = PeriodWeather & Pick<Period, 'variables'> & { start?: string; end?: string };

/**
 * Check that every period has a finite value of each of `names`; throws
 * MissingVariableValuesError naming every period without one (never assumed).
 */
export function checkVariableValues(
  periods: readonly Pick<Period, 'variables' | 'start' | 'end'>[],
  names: readonly string[],
  purpose: 'baseline' | 'savings',
): void {
  if (names.length === 0) return;
  const missing = periods
    .map((period) => ({
      start: period.start,
      end: period.end,
      missing: names.filter((name) => !Number.isFinite(period.variables?.[name] ?? Number.NaN)),
    }))
    .filter((period) => period.missing.length > 0);
  if (missing.length > 0) throw new MissingVariableValuesError(purpose, names, missing);
}

/** The period's values of `names`, in order; throws naming the period and the variable when one is missing. */
export function variableValues(period: PeriodInputs, names: readonly string[]): number[] {
  return names.map((name) => {
    const value = period.variables?.[name];
    if (value === undefined || !Number.isFinite(value)) {
      const when = period.start !== undefined ? ` for the period ${period.start} to ${period.end}` : '';
      throw new RangeError(
        `no value of the variable "${name}"${when}: a model with variables needs every period's values`,
      );
    }
    return value;
  });
}

/** The full design row: the shape's columns, then the variables'. */
export function designRowWithVariables(
  model: ModelName,
  changepoints: Changepoints,
  period: PeriodInputs,
  form: TemperatureForm,
  names: readonly string[],
): number[] {
  const row = periodDesignRow(model, changepoints, period, form);
  return names.length === 0 ? row : [...row, ...variableValues(period, names)];
}

/** A fitted model's variables (none for a weather-only fit). */
export function fitVariables(fit: { variables?: readonly string[] }): readonly string[] {
  return fit.variables ?? [];
}

/** Predicted use per day over a period by a fitted model, variables included. */
export function predictWithVariables(
  fit: {
    model: ModelName;
    changepoints: Changepoints;
    rawCoefficients: readonly number[];
    variables?: readonly string[];
  },
  period: PeriodInputs,
  form: TemperatureForm,
): number {
  const row = designRowWithVariables(fit.model, fit.changepoints, period, form, fitVariables(fit));
  return row.reduce((sum, value, j) => sum + value * fit.rawCoefficients[j]!, 0);
}
