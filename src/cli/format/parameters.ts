/** A shape's parameters in a compact line, in the engine's order. */
import { formatSignificant } from './numbers.js';

const SHORT_NAMES: Record<string, string> = {
  base: 'base',
  intercept: 'intercept',
  slope: 'slope',
  heatingSlope: 'heat slope',
  coolingSlope: 'cool slope',
  slopeBelow: 'slope below',
  slopeAbove: 'slope above',
  heatingChangepoint: 'heat cp',
  coolingChangepoint: 'cool cp',
  changepoint: 'cp',
};

export function parameterSummary(parameters: Readonly<Record<string, number>>, unitSymbol: string): string {
  return Object.entries(parameters)
    .map(([name, value]) => {
      const label = SHORT_NAMES[name] ?? name;
      const suffix = /changepoint/i.test(name) ? ` ${unitSymbol}` : '';
      return `${label} ${formatSignificant(value)}${suffix}`;
    })
    .join(', ');
}

export function parameterLegend(unitSymbol: string): string {
  return `Slopes are use per day per ${unitSymbol}; "cp" is a changepoint; SSE is the day-weighted sum of squared per-day residuals.`;
}
