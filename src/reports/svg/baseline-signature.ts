/**
 * A baseline's energy-signature chart from its fit and its aligned periods:
 * the points (signature-points.ts) drawn by renderSignatureSvg. Pure: the
 * service loads and aligns; this only draws.
 */
import type { BaselineSignatureInput } from '../baseline-signature-input.js';
import { renderSignatureSvg } from './signature.js';
import { signatureChartPoints } from './signature-points.js';

/** The chart as SVG text. */
export function renderBaselineSignature(input: BaselineSignatureInput): string {
  const { fit, baselinePeriods, reportingPeriods, ...header } = input;
  return renderSignatureSvg({
    ...header,
    ...signatureChartPoints(fit, baselinePeriods, reportingPeriods, input.temperatureUnit, input.useUnit),
  });
}
