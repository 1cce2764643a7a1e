/**
 * A baseline's energy-signature chart from its fit and its aligned periods:
 * the points (signature-points.ts) drawn by renderSignatureSvg. Pure: the
 * service loads and aligns; this only draws.
 */
import type { ShapeFit, TemperatureUnit } from '../../engine/index.js';
import { renderSignatureSvg } from './signature.js';
import { signatureChartPoints, type ChartPeriod } from './signature-points.js';

export interface BaselineSignatureInput {
  meterName: string;
  /** The baseline's chosen shape, e.g. 3PH. */
  model: string;
  version: number;
  status: string;
  baselineStart: string;
  baselineEnd: string;
  temperatureUnit: TemperatureUnit;
  /** The meter's unit of quantity, e.g. kWh. */
  useUnit: string;
  fit: ShapeFit;
  baselinePeriods: readonly ChartPeriod[];
  /** Reporting periods (none for a draft), each with its non-routine adjustments. */
  reportingPeriods: readonly ChartPeriod[];
}

/** The chart as SVG text. */
export function renderBaselineSignature(input: BaselineSignatureInput): string {
  const { fit, baselinePeriods, reportingPeriods, ...header } = input;
  return renderSignatureSvg({
    ...header,
    ...signatureChartPoints(fit, baselinePeriods, reportingPeriods, input.temperatureUnit, input.useUnit),
  });
}
