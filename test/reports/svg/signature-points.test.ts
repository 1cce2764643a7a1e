/**
 * The energy signature's points from a fitted model (signature-points.ts).
 * Check values: hand-worked arithmetic on an invented 3PH model and the
 * engine itself (predictPeriodPerDay, fitShape on synthetic bills).
 */
import { describe, expect, it } from 'vitest';
import { alignPeriods, analyseBaseline, predictPeriodPerDay, type ShapeFit } from '../../../src/engine/index.js';
import { fittedVertices, signatureChartPoints, type ChartPeriod } from '../../../src/reports/svg/signature-points.js';
import { NET_OF_ADJUSTMENTS_NOTE, renderSignatureSvg } from '../../../src/reports/svg/signature.js';
import { CLIMATES, SAMPLE_BUILDING, dailyWeather, monthlyReadings, seededRandom } from '../../support/synthetic.js';

// An invented day-resolved 3PH: 20 per day plus 6 per degree below 60 (raw coefficients [b0, b1] on (60 − T)₊).
const DAILY_3PH = {
  model: '3PH',
  temperatureForm: 'daily',
  changepoints: { heating: 60, cooling: null },
  rawCoefficients: [20, 6],
  temperatureRange: { min: 40, max: 70 },
  dayTemperatureRange: { min: 30, max: 80 },
} as unknown as ShapeFit;

describe('fittedVertices', () => {
  it('runs a day-resolved line over the daily range it saw, through the changepoint (hand-worked)', () => {
    // 20 + 6·(60 − 30) = 200 at 30; 20 at 60 and at 80.
    expect(fittedVertices(DAILY_3PH)).toEqual([
      { temp: 30, usePerDay: 200 },
      { temp: 60, usePerDay: 20 },
      { temp: 80, usePerDay: 20 },
    ]);
  });

  it('runs a mean-form line (and one stored before the form) over the range of period means (hand-worked)', () => {
    const mean = { ...DAILY_3PH, temperatureForm: 'mean', dayTemperatureRange: null } as unknown as ShapeFit;
    // 20 + 6·(60 − 40) = 140 at 40.
    expect(fittedVertices(mean)).toEqual([
      { temp: 40, usePerDay: 140 },
      { temp: 60, usePerDay: 20 },
      { temp: 70, usePerDay: 20 },
    ]);
    const { temperatureForm: _form, ...old } = mean as unknown as Record<string, unknown>;
    expect(fittedVertices(old as unknown as ShapeFit)).toEqual(fittedVertices(mean));
  });
});

describe('signatureChartPoints', () => {
  it('marks a bill straddling the changepoint above the line at its mean (hand-worked)', () => {
    // Days at 50 and 70: mean 60, where the line gives 20; the bill expects 20 + 6·mean(10, 0) = 50.
    const bill: ChartPeriod = {
      start: '2030-01-01',
      end: '2030-01-03',
      days: 2,
      meanTemp: 60,
      usePerDay: 48,
      dayTemps: [50, 70],
    };
    const series = signatureChartPoints(DAILY_3PH, [bill], [], 'F', 'therm');
    expect(series.temperatureForm).toBe('daily');
    expect(series.expected).toHaveLength(1);
    expect(series.expected[0]).toMatchObject({ temp: 60, usePerDay: 50 });
    expect(series.expected[0]!.label).toContain('baseline 2030-01-01 to 2030-01-03: expected 50.00 therm/day');
    expect(series.baseline[0]).toMatchObject({ temp: 60, usePerDay: 48 });
  });

  it('takes a reporting period’s expected use as given, and marks no one-day reading or mean-form model', () => {
    const reporting: ChartPeriod = {
      start: '2031-01-01',
      end: '2031-02-01',
      days: 31,
      meanTemp: 45,
      usePerDay: 90,
      expectedPerDay: 123.5,
    };
    const day: ChartPeriod = {
      start: '2031-02-01',
      end: '2031-02-02',
      days: 1,
      meanTemp: 45,
      usePerDay: 100,
      dayTemps: [45],
    };
    const series = signatureChartPoints(DAILY_3PH, [day], [reporting], 'C', 'kWh');
    expect(series.expected).toEqual([expect.objectContaining({ temp: 45, usePerDay: 123.5 })]);
    const mean = { ...DAILY_3PH, temperatureForm: 'mean' } as unknown as ShapeFit;
    expect(signatureChartPoints(mean, [day], [reporting], 'C', 'kWh').expected).toEqual([]);
  });

  it('gives each real bill the engine’s own expected use (synthetic bills, day-resolved fit)', () => {
    const random = seededRandom(5);
    const weather = dailyWeather(CLIMATES.temperate, '2030-01-01', 400, random);
    const bills = monthlyReadings(SAMPLE_BUILDING, weather, '2030-01-01', 12, random);
    const analysis = analyseBaseline(bills, weather);
    const fit = analysis.choice.candidates.find((c) => c.model === analysis.choice.selected)!.fit!;
    const periods = alignPeriods(bills, weather).periods;
    const series = signatureChartPoints(fit, periods, [], 'F', 'kWh');
    expect(series.expected).toHaveLength(12);
    series.expected.forEach((point, i) => {
      // The engine itself.
      expect(point.usePerDay).toBeCloseTo(
        predictPeriodPerDay(fit.model, fit.changepoints, fit.rawCoefficients, periods[i]!, 'daily'),
        9,
      );
    });
    expect(series.fittedLine[0]!.temp).toBe(fit.dayTemperatureRange!.min);
    expect(series.fittedLine.at(-1)!.temp).toBe(fit.dayTemperatureRange!.max);
  });
});

describe('the signature chart contradicted the table when a non-routine adjustment applied', () => {
  it('draws a reporting period net of its adjustment, so it sits below the line when the table says energy was saved (hand-worked)', () => {
    const mean = { ...DAILY_3PH, temperatureForm: 'mean', dayTemperatureRange: null } as unknown as ShapeFit;
    // At 50 degrees the line gives 20 + 6·10 = 80 a day. The period used 90 a day, but 620 over its 31 days (20 a day)
    // is added load the adjustment accounts for: adjusted baseline 100 a day, 10 a day saved; net of it, 70 < 80.
    const period: ChartPeriod = {
      start: '2031-01-01',
      end: '2031-02-01',
      days: 31,
      meanTemp: 50,
      usePerDay: 90,
      adjustment: 620,
    };
    const plain: ChartPeriod = { start: '2031-02-01', end: '2031-03-01', days: 28, meanTemp: 50, usePerDay: 75 };
    const series = signatureChartPoints(mean, [], [period, plain], 'F', 'kWh');
    expect(series.reporting[0]!.usePerDay).toBeCloseTo(70, 12); // hand-worked: 90 − 620/31
    expect(series.reporting[0]!.label).toContain('net of non-routine adjustments');
    expect(series.reporting[1]!.usePerDay).toBe(75); // no adjustment: as metered
    expect(series.reportingNetOfAdjustments).toBe(true);
    expect(signatureChartPoints(mean, [], [plain], 'F', 'kWh').reportingNetOfAdjustments).toBe(false);

    const svg = renderSignatureSvg({
      meterName: 'Invented meter',
      model: '3PH',
      version: 1,
      status: 'frozen',
      baselineStart: '2030-01-01',
      baselineEnd: '2031-01-01',
      temperatureUnit: 'F',
      useUnit: 'kWh',
      ...series,
    });
    expect(svg).toContain('Reporting periods, net of adjustments (2)');
    expect(svg).toContain(NET_OF_ADJUSTMENTS_NOTE.slice(0, 40));
  });
});
