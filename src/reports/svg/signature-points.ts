/**
 * The energy signature's points from a fitted model and its periods: each
 * period at its mean temperature, the model's line, and, for a day-resolved
 * model, each bill's own expected use. Pure: the engine computes every model
 * value; this only arranges them for renderSignatureSvg.
 *
 * A day-resolved model is a daily response, so its line is drawn over the
 * range of daily temperatures it saw (wider than the range of bill means),
 * and a bill's expected use per day is the mean of that response over the
 * bill's own days (predictPeriodPerDay), which sits above the line at the
 * bill's mean temperature wherever the bill's days straddle a changepoint.
 */
import {
  fitTemperatureForm,
  predictPerDay,
  predictPeriodPerDay,
  type Period,
  type ShapeFit,
  type TemperatureForm,
  type TemperatureUnit,
} from '../../engine/index.js';
import type { SignaturePoint } from './signature.js';

/** What the chart needs of a period; `expectedPerDay` is given when the caller has it already (a projection's model baseline ÷ days). */
export interface ChartPeriod {
  start: string;
  end: string;
  days: number;
  meanTemp: number;
  usePerDay: number;
  dayTemps?: readonly number[];
  expectedPerDay?: number;
  /**
   * Non-routine adjustments falling in the period (+ adds to the adjusted
   * baseline). A reporting period is drawn net of it, (actual − adjustment)
   * per day, so its mark sits against the model's line as its savings do.
   */
  adjustment?: number;
}

export interface SignatureSeries {
  temperatureForm: TemperatureForm;
  baseline: SignaturePoint[];
  reporting: SignaturePoint[];
  /** Vertices of the model's line: its ends and any changepoint between them. */
  fittedLine: SignaturePoint[];
  /** Day-resolved models: each bill's expected use per day (the model's mean over its days), at its mean temperature; empty otherwise. */
  expected: SignaturePoint[];
  /** Reporting periods are drawn net of their non-routine adjustments (some period has one). */
  reportingNetOfAdjustments: boolean;
}

function degreeOf(unit: TemperatureUnit): string {
  return unit === 'F' ? '°F' : '°C';
}

/** A period at its mean temperature, its dates and figures as the mark's tooltip; net of its non-routine adjustments when it has any. */
export function chartPoint(period: ChartPeriod, unit: TemperatureUnit, useUnit: string): SignaturePoint {
  const where = `${period.start} to ${period.end}: ${period.meanTemp.toFixed(1)} ${degreeOf(unit)}`;
  const adjustment = period.adjustment ?? 0;
  if (adjustment === 0)
    return {
      temp: period.meanTemp,
      usePerDay: period.usePerDay,
      label: `${where}, ${period.usePerDay.toPrecision(4)} ${useUnit}/day`,
    };
  const net = period.usePerDay - adjustment / period.days;
  return {
    temp: period.meanTemp,
    usePerDay: net,
    label: `${where}, ${net.toPrecision(4)} ${useUnit}/day net of non-routine adjustments (actual ${period.usePerDay.toPrecision(4)}, adjustment ${(adjustment / period.days).toPrecision(4)} ${useUnit}/day)`,
  };
}

/** Whether any reporting period is drawn net of adjustments (the chart then says so). */
export function anyAdjusted(periods: readonly ChartPeriod[]): boolean {
  return periods.some((p) => (p.adjustment ?? 0) !== 0);
}

/**
 * The model's vertices: over the daily temperature range a day-resolved model
 * saw, else over the range of the baseline's period means.
 */
export function fittedVertices(fit: ShapeFit): SignaturePoint[] {
  const range =
    fitTemperatureForm(fit) === 'daily' && fit.dayTemperatureRange ? fit.dayTemperatureRange : fit.temperatureRange;
  const { min, max } = range;
  const inside = [fit.changepoints.heating, fit.changepoints.cooling].filter(
    (c): c is number => c !== null && c > min && c < max,
  );
  const temps = [...new Set([min, ...inside, max])].sort((a, b) => a - b);
  return temps.map((temp) => ({
    temp,
    usePerDay: predictPerDay(fit.model, fit.changepoints, fit.rawCoefficients, temp),
  }));
}

/** A bill's expected use per day in the model's own form, or null when it cannot be known (no days' temperatures). */
function expectedPerDay(fit: ShapeFit, period: ChartPeriod): number | null {
  if (period.expectedPerDay !== undefined) return period.expectedPerDay;
  if (!period.dayTemps || period.dayTemps.length === 0) return null;
  const weather: Pick<Period, 'meanTemp' | 'dayTemps'> = { meanTemp: period.meanTemp, dayTemps: period.dayTemps };
  return predictPeriodPerDay(fit.model, fit.changepoints, fit.rawCoefficients, weather, 'daily');
}

/** Every series of the chart of `fit` with its baseline and reporting periods. */
export function signatureChartPoints(
  fit: ShapeFit,
  baseline: readonly ChartPeriod[],
  reporting: readonly ChartPeriod[],
  unit: TemperatureUnit,
  useUnit: string,
): SignatureSeries {
  const form = fitTemperatureForm(fit);
  const expected: SignaturePoint[] = [];
  if (form === 'daily') {
    // One-day readings sit on the line by definition: only bills get a mark of their own.
    for (const [kind, periods] of [
      ['baseline', baseline],
      ['reporting', reporting],
    ] as const) {
      for (const period of periods) {
        if (period.days <= 1) continue;
        const value = expectedPerDay(fit, period);
        if (value === null || !Number.isFinite(value)) continue;
        expected.push({
          temp: period.meanTemp,
          usePerDay: value,
          label: `${kind} ${period.start} to ${period.end}: expected ${value.toPrecision(4)} ${useUnit}/day (the daily response averaged over its days), at ${period.meanTemp.toFixed(1)} ${degreeOf(unit)}`,
        });
      }
    }
  }
  return {
    temperatureForm: form,
    baseline: baseline.map((p) => chartPoint(p, unit, useUnit)),
    reporting: reporting.map((p) => chartPoint(p, unit, useUnit)),
    fittedLine: fittedVertices(fit),
    expected,
    reportingNetOfAdjustments: anyAdjusted(reporting),
  };
}
