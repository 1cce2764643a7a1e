/**
 * What a baseline's energy-signature chart is drawn from: the service loads
 * and aligns it, the HTTP route hands it to svg/baseline-signature.ts.
 */
import type { ShapeFit, TemperatureUnit } from '../engine/index.js';
import type { ChartPeriod } from './svg/signature-points.js';

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
