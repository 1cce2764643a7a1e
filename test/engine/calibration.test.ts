/**
 * Calibration in miniature: invented buildings that answer each day's
 * temperature, with no noise at all and no retrofit, billed in 28–33-day
 * bills over two baseline years and one reporting year. The truth is set by
 * the test: the saving is exactly 0, so any saving found is model-form
 * error. The full seeded study is `npm run bench:calibration`.
 *
 * Fitting each bill against its mean temperature ('mean' form) leaves a
 * model-form error (asserted below, sizes in the comments). The day-resolved
 * form ('daily', the default: each bill against the mean of the daily
 * response over its days) reproduces noise-free data exactly.
 *
 * The last block checks the checker: the simulation's weather and noise
 * have the persistence and spread it states.
 */
import { describe, expect, it } from 'vitest';
import type { ModelName } from '../../src/engine/index.js';
import {
  INVENTED_CLIMATES,
  TWO_YEARS_THEN_ONE,
  ar1Series,
  makeStation,
  meterNoise,
  planStudy,
  seasonalTemperature,
  seededRandom,
  signature,
  simulateMeter,
  stationShocks,
  type ClimateName,
  type SimulatedBuilding,
} from '../support/simulation/index.js';
import { baselineInForm, savingsAt, selectedFit, type TemperatureForm } from '../support/temperature-forms.js';
import { daysBetween } from '../../src/engine/dates.js';

const NOISE_FREE = { dailyNoise: 0, noisePersistence: 0, stationShare: 0, relativeNoise: 0 } as const;

interface Case {
  name: string;
  climate: ClimateName;
  building: SimulatedBuilding;
  truth: ModelName;
  /** The building's parameters as the engine names them (slopes as dy/dx). */
  parameters: Record<string, number>;
  seed: number;
}

// Synthetic: the test sets the truth (invented buildings, no noise, no retrofit; true saving 0).
const CASES: readonly Case[] = [
  {
    name: 'heating-dominated building in the mild climate',
    climate: 'mild',
    building: {
      ...NOISE_FREE,
      archetype: 'heating',
      base: 20,
      heatingBelow: 58,
      heatingRate: 6,
      coolingAbove: 65,
      coolingRate: 0,
    },
    truth: '3PH',
    parameters: { base: 20, heatingSlope: -6, heatingChangepoint: 58 },
    seed: 5,
  },
  {
    name: 'cooling-dominated building in the hot climate',
    climate: 'hot',
    building: {
      ...NOISE_FREE,
      archetype: 'cooling',
      base: 800,
      heatingBelow: 55,
      heatingRate: 0,
      coolingAbove: 64,
      coolingRate: 30,
    },
    truth: '3PC',
    parameters: { base: 800, coolingSlope: 30, coolingChangepoint: 64 },
    seed: 5,
  },
  {
    name: '5P building in the continental climate',
    climate: 'continental',
    building: {
      ...NOISE_FREE,
      archetype: 'fivePoint',
      base: 900,
      heatingBelow: 52,
      heatingRate: 15,
      coolingAbove: 64,
      coolingRate: 30,
    },
    truth: '5P',
    parameters: { base: 900, heatingSlope: -15, coolingSlope: 30, heatingChangepoint: 52, coolingChangepoint: 64 },
    seed: 5,
  },
];

function runCase(c: Case, form: TemperatureForm) {
  const random = seededRandom(c.seed);
  const plan = planStudy(TWO_YEARS_THEN_ONE, random);
  const station = makeStation(INVENTED_CLIMATES[c.climate], plan.start, plan.days, random);
  const meter = simulateMeter(c.building, station, plan, random);
  const analysis = baselineInForm(meter.baseline, station.weather, form);
  const [savings] = savingsAt(analysis, meter.reporting, station.weather, [0.68]);
  return {
    meter,
    analysis,
    fit: selectedFit(analysis),
    savings: savings!,
    trueShapeFit: analysis.choice.candidates.find((k) => k.model === c.truth)?.fit ?? null,
  };
}

describe('noise-free invented buildings, no retrofit: the mean-temperature form', () => {
  // Measured when written (seed 5): false savings −0.79%, −0.42%, −0.65% of the
  // adjusted baseline; CV(RMSE) 4.5%, 0.54%, 0.84% on data without any noise.
  it.each(CASES)('$name: the fit cannot reproduce the daily response, and the no-retrofit year shows a saving', (c) => {
    const { meter, fit, savings } = runCase(c, 'mean');
    expect(meter.trueSavings).toBe(0); // synthetic: no retrofit
    expect(meter.noise.every((e) => e === 0)).toBe(true); // synthetic: noise-free
    expect(fit.stats.cvrmse).toBeGreaterThan(1e-3); // model-form error alone: a noise-free exact model would give 0
    expect(Math.abs(savings.totals.fractionSaved)).toBeGreaterThan(1e-3); // truth 0; the mean form's error is well above rounding
  });
});

describe('noise-free invented buildings, no retrofit: the day-resolved form', () => {
  it.each(CASES)('$name: no false saving, an exact fit and the building recovered', (c) => {
    const { fit, savings, trueShapeFit } = runCase(c, 'daily');
    expect(Math.abs(savings.totals.savings)).toBeLessThanOrEqual(1e-6 * savings.totals.adjustedBaseline); // synthetic truth: 0
    expect(fit.stats.cvrmse).toBeLessThan(1e-6); // noise-free data, the model's own form
    expect(trueShapeFit).not.toBeNull();
    for (const [name, value] of Object.entries(c.parameters)) {
      expect(Math.abs(trueShapeFit!.parameters[name]! - value)).toBeLessThanOrEqual(
        1e-6 * Math.max(1, Math.abs(value)),
      ); // synthetic truth
    }
  });

  it('the forms differ on bills (the option is honoured)', () => {
    const [mean, daily] = (['mean', 'daily'] as const).map((form) => runCase(CASES[0]!, form).fit);
    expect(daily!.sse).toBeLessThan(mean!.sse);
  });
});

describe('the simulation itself', () => {
  it('bills are 28–33 days, consecutive bills share the read date, and each bill sums its days', () => {
    const random = seededRandom(11);
    const plan = planStudy(TWO_YEARS_THEN_ONE, random);
    const station = makeStation(INVENTED_CLIMATES.continental, plan.start, plan.days, random);
    const building = CASES[2]!.building;
    const meter = simulateMeter(building, station, plan, random, { retrofit: { shareSaved: 0.1 } });
    expect(meter.baseline).toHaveLength(24); // synthetic: two baseline years of bills
    expect(meter.reporting).toHaveLength(12); // synthetic: one reporting year
    const all = [...meter.baseline, ...meter.reporting];
    all.forEach((bill, i) => {
      const days = daysBetween(bill.start, bill.end);
      expect(days).toBeGreaterThanOrEqual(28);
      expect(days).toBeLessThanOrEqual(33);
      if (i > 0) expect(bill.start).toBe(all[i - 1]!.end);
    });
    expect(station.weather[0]!.date).toBe(plan.start);
    expect(station.weather).toHaveLength(daysBetween(plan.start, all[all.length - 1]!.end));
    // A bill is the sum of the building's use on the station's reported temperatures (noise-free here).
    const first = all[0]!;
    const expected = station.weather
      .slice(0, daysBetween(first.start, first.end))
      .reduce((sum, day) => sum + signature(building, day.temp), 0);
    expect(first.quantity).toBeCloseTo(expected, 9);
    // The retrofit takes 10% off every reporting day (hand-worked from the definition).
    const reportingTotal = meter.reporting.reduce((sum, bill) => sum + bill.quantity, 0);
    expect(meter.trueSavings).toBeCloseTo(reportingTotal / 0.9 - reportingTotal, 6);
  });

  // Tolerances are 4 standard errors from the large-sample variances of an
  // AR(1) series of n values (Bartlett; from memory): the lag-1
  // autocorrelation has variance (1 − φ²)/n, the sample variance
  // 2σ⁴(1 + φ²)/(n(1 − φ²)), so the sd's relative error is about
  // √((1 + φ²)/(2n(1 − φ²))).
  const lagOne = (values: readonly number[]): number => {
    const mean = values.reduce((s, v) => s + v, 0) / values.length;
    let num = 0;
    let den = 0;
    for (let i = 0; i < values.length; i++) {
      const d = values[i]! - mean;
      den += d * d;
      if (i > 0) num += d * (values[i - 1]! - mean);
    }
    return num / den;
  };
  const sd = (values: readonly number[]): number => {
    const mean = values.reduce((s, v) => s + v, 0) / values.length;
    return Math.sqrt(values.reduce((s, v) => s + (v - mean) ** 2, 0) / (values.length - 1));
  };
  const lagOneTolerance = (phi: number, n: number): number => 4 * Math.sqrt((1 - phi * phi) / n);
  const sdTolerance = (phi: number, n: number): number => 4 * Math.sqrt((1 + phi * phi) / (2 * n * (1 - phi * phi)));

  it.each(Object.entries(INVENTED_CLIMATES))(
    '%s weather departs from its seasonal curve with the stated persistence and spread',
    (_, climate) => {
      const days = 20 * 365;
      const weather = makeStation(climate, '2030-01-01', days, seededRandom(21)).weather;
      // Departures from the seasonal curve; the 0.1° rounding adds a variance of 0.01/12, negligible here.
      const departures = weather.map((day, d) => day.temp - seasonalTemperature(climate, d));
      expect(Math.abs(lagOne(departures) - climate.persistence)).toBeLessThan(
        lagOneTolerance(climate.persistence, days),
      ); // the climate's stated φ
      expect(Math.abs(sd(departures) / climate.dailySpread - 1)).toBeLessThan(sdTolerance(climate.persistence, days)); // the climate's stated spread
    },
  );

  it.each([0, 0.6, 0.8])(
    'meter noise with φ = %s and a station share of 0.4 has that persistence, its spread, and correlates 0.4 between meters',
    (phi) => {
      const days = 20_000;
      const random = seededRandom(31);
      const shocks = stationShocks(days, phi, random);
      const building: SimulatedBuilding = {
        ...CASES[0]!.building,
        dailyNoise: 5,
        noisePersistence: phi,
        stationShare: 0.4,
      };
      const [a, b] = [meterNoise(building, days, random, shocks), meterNoise(building, days, random, shocks)];
      for (const noise of [a!, b!]) {
        expect(Math.abs(lagOne(noise) - phi)).toBeLessThan(lagOneTolerance(phi, days)); // stated φ
        expect(Math.abs(sd(noise) / 5 - 1)).toBeLessThan(sdTolerance(phi, days)); // stated spread 5
      }
      // Cross-correlation of two AR(1) series of equal φ: variance about (1 + φ²)/(1 − φ²)·(1 + ρ²)/n, taken generously (from memory).
      const mean = (v: readonly number[]) => v.reduce((s, x) => s + x, 0) / v.length;
      const [ma, mb] = [mean(a!), mean(b!)];
      const cov = a!.reduce((s, x, i) => s + (x - ma) * (b![i]! - mb), 0) / (days - 1);
      const correlation = cov / (sd(a!) * sd(b!));
      expect(Math.abs(correlation - 0.4)).toBeLessThan(
        4 * Math.sqrt((((1 + phi * phi) / (1 - phi * phi)) * (1 + 0.16)) / days),
      ); // stated share 0.4
    },
  );

  it('ar1Series keeps its spread from the first value (a stationary start)', () => {
    // Across many short series, the first value's spread is the stated one: its sd over 4,000 draws has relative error about 1/√8000.
    const random = seededRandom(41);
    const firsts = Array.from({ length: 4000 }, () => ar1Series(3, 2, 0.8, random)[0]!);
    expect(Math.abs(sd(firsts) / 2 - 1)).toBeLessThan(4 / Math.sqrt(8000)); // stated spread 2
  });
});
