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
 */
import type { ModelName } from '../types.js';

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
