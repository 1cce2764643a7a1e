/**
 * A meter report's energy-signature data: the frozen model's periods and its
 * line, and the reporting periods as projected (net of their non-routine
 * adjustments), labelled for the chart and the JSON.
 */
import type { Period, SavingsDocument, ShapeFit, TemperatureUnit } from '../engine/index.js';
import type { SignatureData } from './savings-report.js';
import { signatureChartPoints } from './svg/signature-points.js';

/** What the chart needs of the frozen model. */
export interface SignatureModel {
  fit: ShapeFit;
  /** The baseline's own periods as fitted. */
  baselinePeriods: readonly Period[];
  temperatureUnit: TemperatureUnit;
}

export function signatureData(model: SignatureModel, savings: SavingsDocument, unit: string): SignatureData {
  // A reporting period's expected use per day is the model's projection of it: its model baseline over its days.
  // Each reporting period is drawn net of its non-routine adjustments, so its mark sits against the line as its savings do.
  const reporting = savings.periods.map((p) => ({
    ...p,
    usePerDay: p.actual / p.days,
    expectedPerDay: p.modelBaseline / p.days,
    adjustment: p.adjustment,
  }));
  const series = signatureChartPoints(model.fit, model.baselinePeriods, reporting, model.temperatureUnit, unit);
  const labelled = (points: typeof series.baseline) =>
    points.map((p) => ({ temp: p.temp, usePerDay: p.usePerDay, label: p.label ?? '' }));
  return {
    temperatureUnit: model.temperatureUnit,
    baseline: labelled(series.baseline),
    reporting: labelled(series.reporting),
    fittedLine: series.fittedLine.map((p) => ({ temp: p.temp, usePerDay: p.usePerDay })),
    temperatureForm: series.temperatureForm,
    expected: labelled(series.expected),
    reportingNetOfAdjustments: series.reportingNetOfAdjustments,
  };
}
