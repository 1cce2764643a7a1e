/**
 * A fitted shape as a function of temperature: its design row, its
 * prediction, and the names of its parameters. Used by the fit (to build the
 * regression) and by savings (to project onto reporting-period weather).
 *
 * Every shape is y = b0 + Σ bⱼ·colⱼ(x) with these columns:
 *   1P  [1]                 2P  [1, x]
 *   3PC [1, (x − cC)₊]      3PH [1, (cH − x)₊]
 *   4P  [1, (c − x)₊, (x − c)₊]
 *   5P  [1, (cH − x)₊, (x − cC)₊]
 * Slopes are reported as dy/dx (use per day per degree): a physical heating
 * slope is negative, a physical cooling slope positive.
 *
 * In the day-resolved form a reading's hinge columns are the means over its
 * days of the daily hinges (degree-days per day at the changepoint, see
 * degree-days.ts); x in the linear 2P column is the reading's mean
 * temperature either way, since the mean of a line is the line at the mean.
 */
import type { ModelName, Period, TemperatureForm } from '../types.js';
import { coolingDegreeDaysPerDay, heatingDegreeDaysPerDay, shareAbove, shareBelow } from './degree-days.js';

export interface Changepoints {
  heating: number | null;
  cooling: number | null;
}

/** The design row of `model` at temperature x. */
export function designRow(model: ModelName, changepoints: Changepoints, x: number): number[] {
  const cH = changepoints.heating ?? Number.NaN;
  const cC = changepoints.cooling ?? Number.NaN;
  switch (model) {
    case '1P':
      return [1];
    case '2P':
      return [1, x];
    case '3PC':
      return [1, Math.max(x - cC, 0)];
    case '3PH':
      return [1, Math.max(cH - x, 0)];
    case '4P':
    case '5P':
      return [1, Math.max(cH - x, 0), Math.max(x - cC, 0)];
  }
}

/** Names of the linear coefficients, in design-column order. */
export function coefficientNames(model: ModelName): string[] {
  switch (model) {
    case '1P':
      return ['base'];
    case '2P':
      return ['intercept', 'slope'];
    case '3PC':
      return ['base', 'coolingSlope'];
    case '3PH':
      return ['base', 'heatingSlope'];
    case '4P':
      return ['base', 'slopeBelow', 'slopeAbove'];
    case '5P':
      return ['base', 'heatingSlope', 'coolingSlope'];
  }
}

/**
 * Sign that turns a raw hinge coefficient into dy/dx: the (c − x)₊ column
 * falls as x rises, so its coefficient is negated.
 */
export function slopeSign(model: ModelName, column: number): 1 | -1 {
  if (column === 0) return 1;
  if (model === '3PH') return -1;
  if ((model === '4P' || model === '5P') && column === 1) return -1;
  return 1;
}

/** Names of the changepoints of `model`, in the order they are estimated. */
export function changepointNames(model: ModelName): string[] {
  switch (model) {
    case '3PC':
      return ['coolingChangepoint'];
    case '3PH':
      return ['heatingChangepoint'];
    case '4P':
      return ['changepoint'];
    case '5P':
      return ['heatingChangepoint', 'coolingChangepoint'];
    default:
      return [];
  }
}

/** Predicted use per day at temperature x. */
export function predictPerDay(
  model: ModelName,
  changepoints: Changepoints,
  rawCoefficients: readonly number[],
  x: number,
): number {
  return designRow(model, changepoints, x).reduce((sum, value, j) => sum + value * rawCoefficients[j]!, 0);
}

/** What a model needs of a period's weather: its mean temperature and, for the day-resolved form, its days' temperatures. */
export type PeriodWeather = Pick<Period, 'meanTemp' | 'dayTemps'>;

function dayTempsOf(period: PeriodWeather): readonly number[] {
  if (!period.dayTemps || period.dayTemps.length === 0) {
    throw new RangeError(
      'the day-resolved form needs the daily temperatures of every period (align the readings with alignPeriods)',
    );
  }
  return period.dayTemps;
}

/** The design row of `model` for a whole period, in the given temperature form. */
export function periodDesignRow(
  model: ModelName,
  changepoints: Changepoints,
  period: PeriodWeather,
  form: TemperatureForm,
): number[] {
  if (form === 'mean' || model === '1P' || model === '2P') return designRow(model, changepoints, period.meanTemp);
  const temps = dayTempsOf(period);
  const cH = changepoints.heating ?? Number.NaN;
  const cC = changepoints.cooling ?? Number.NaN;
  switch (model) {
    case '3PC':
      return [1, coolingDegreeDaysPerDay(temps, cC)];
    case '3PH':
      return [1, heatingDegreeDaysPerDay(temps, cH)];
    case '4P':
    case '5P':
      return [1, heatingDegreeDaysPerDay(temps, cH), coolingDegreeDaysPerDay(temps, cC)];
  }
}

/** Predicted use per day over a whole period, in the given temperature form. */
export function predictPeriodPerDay(
  model: ModelName,
  changepoints: Changepoints,
  rawCoefficients: readonly number[],
  period: PeriodWeather,
  form: TemperatureForm,
): number {
  return periodDesignRow(model, changepoints, period, form).reduce(
    (sum, value, j) => sum + value * rawCoefficients[j]!,
    0,
  );
}

/**
 * ∂(predicted use per day)/∂(changepoint) for a period, one entry per
 * changepoint of the model (changepointNames order). For the heating term
 * bh·mean(cH − T)₊ it is bh × the share of days below cH; for the cooling
 * term bq·mean(T − cC)₊ it is −bq × the share of days above cC. In the mean
 * form the share is 0 or 1, by the period's mean temperature.
 */
export function changepointDerivatives(
  model: ModelName,
  changepoints: Changepoints,
  rawCoefficients: readonly number[],
  period: PeriodWeather,
  form: TemperatureForm,
): number[] {
  const cH = changepoints.heating ?? Number.NaN;
  const cC = changepoints.cooling ?? Number.NaN;
  const below = (c: number): number =>
    form === 'mean' ? (period.meanTemp < c ? 1 : 0) : shareBelow(dayTempsOf(period), c);
  const above = (c: number): number =>
    form === 'mean' ? (period.meanTemp > c ? 1 : 0) : shareAbove(dayTempsOf(period), c);
  switch (model) {
    case '3PC':
      return [-rawCoefficients[1]! * above(cC)];
    case '3PH':
      return [rawCoefficients[1]! * below(cH)];
    case '4P':
      return [rawCoefficients[1]! * below(cH) - rawCoefficients[2]! * above(cC)];
    case '5P':
      return [rawCoefficients[1]! * below(cH), -rawCoefficients[2]! * above(cC)];
    default:
      return [];
  }
}
