import { describe, it, expect } from 'vitest';
import { analyseBaseline, type BaselineAnalysis } from '../../src/engine/index.js';
import type { ShapeFit } from '../../src/engine/fit/fit-shape.js';
import type { DailyTemperature, ModelName } from '../../src/engine/types.js';
import {
  CLIMATES,
  SAMPLE_BUILDING,
  dailyReadings,
  dailyWeather,
  monthlyReadings,
  seededRandom,
  type Building,
  type Climate,
} from '../support/synthetic.js';

/**
 * One invented building (300 kWh/day; heating below 55 °F at 8 kWh/day/°F;
 * cooling above 68 °F at 10 kWh/day/°F; day-to-day noise 15 kWh/day) seen
 * in four invented climates. Common practice (brief): the same building
 * looks like a cooling line where it is hot, a heating line where it is
 * cold, and shows heating–flat–cooling only where its weather spans all
 * three regions; the shape must follow the weather actually seen.
 *
 * Each scenario is simulated with five seeds. The rule tests each richer
 * shape at α = 0.05, so an occasional richer pick on one seed is expected
 * behaviour, not a failure; where a count below five is allowed, the comment
 * gives the count measured over 20 seeds when the test was written.
 */
const SEEDS = [1, 2, 3, 4, 5];
const START = '2031-01-01';
const WEATHER_DAYS = 3 * 365 + 1;

const WEATHER_INDEPENDENT: Building = { ...SAMPLE_BUILDING, heatingRate: 0, coolingRate: 0 };

type DataKind = { monthly: number } | { daily: number };

function weatherFor(climate: Climate, seed: number): DailyTemperature[] {
  return dailyWeather(climate, START, WEATHER_DAYS, seededRandom(seed * 7919));
}

function analyse(climate: Climate, building: Building, kind: DataKind, seed: number): BaselineAnalysis {
  const weather = weatherFor(climate, seed);
  const useRandom = seededRandom(seed * 7919 + 1);
  const readings =
    'monthly' in kind
      ? monthlyReadings(building, weather, START, kind.monthly, useRandom)
      : dailyReadings(building, weather.slice(0, kind.daily), useRandom);
  return analyseBaseline(readings, weather);
}

function selectedFit(analysis: BaselineAnalysis): ShapeFit {
  return analysis.choice.candidates.find((c) => c.model === analysis.choice.selected)!.fit!;
}

/** Which branches a fitted shape has: a falling (heating) and/or a rising (cooling) part, as dy/dx. */
function branches(fit: ShapeFit): { heating: boolean; cooling: boolean } {
  const slopes = fit.coefficients.filter((c) => c.name !== 'base' && c.name !== 'intercept').map((c) => c.estimate);
  return { heating: slopes.some((s) => s < 0), cooling: slopes.some((s) => s > 0) };
}

function describeKind(kind: DataKind): string {
  return 'monthly' in kind ? `${kind.monthly} monthly bills` : `${kind.daily} days of daily data`;
}

/** Monthly means of the weather, for the facts each climate is built to have. */
function monthlyMeans(weather: readonly DailyTemperature[]): number[] {
  const byMonth = new Map<string, number[]>();
  for (const day of weather) {
    const key = day.date.slice(0, 7);
    byMonth.set(key, [...(byMonth.get(key) ?? []), day.temp]);
  }
  return [...byMonth.values()].map((temps) => temps.reduce((a, b) => a + b, 0) / temps.length);
}

describe('the invented climates have the weather they are meant to have (synthetic: the test sets the truth)', () => {
  for (const seed of SEEDS) {
    it(`seed ${seed}`, () => {
      const hot = weatherFor(CLIMATES.hot, seed);
      const hotMonths = monthlyMeans(hot);
      expect(Math.min(...hotMonths)).toBeGreaterThan(55); // no heating month
      expect(hotMonths.filter((t) => t < 65).length).toBeGreaterThanOrEqual(3); // flat months
      expect(Math.max(...hotMonths)).toBeGreaterThan(80); // cooling months

      const cold = weatherFor(CLIMATES.subArctic, seed);
      expect(Math.max(...cold.map((d) => d.temp))).toBeLessThan(72); // summer peaks barely reach cooling
      expect(monthlyMeans(cold).filter((t) => t > 55).length).toBeGreaterThanOrEqual(3); // a short flat season

      const mild = weatherFor(CLIMATES.mild, seed);
      expect(Math.max(...mild.map((d) => d.temp))).toBeLessThan(68); // never reaches the cooling changepoint

      const temperateMonths = monthlyMeans(weatherFor(CLIMATES.temperate, seed));
      expect(Math.min(...temperateMonths)).toBeLessThan(45);
      expect(Math.max(...temperateMonths)).toBeGreaterThan(75);
      expect(temperateMonths.filter((t) => t > 57 && t < 66).length).toBeGreaterThanOrEqual(3);
    });
  }
});

interface Expectation {
  climate: keyof typeof CLIMATES;
  shape: ModelName;
  /** Seeds (of 5) that must select `shape`. */
  atLeast: number;
}

describe('daily data: the shape follows the weather seen (common practice)', () => {
  const expectations: Expectation[] = [
    // measured over seeds 1–20 when written (730 days / 365 days): hot 16/20 and 18/20 3PC (else a 4P
    // with a small flat-side slope, or a 5P: a few days below 55 do occur); sub-arctic 18/20 and
    // 19/20 3PH (else 4P); temperate 20/20 5P; mild 20/20 and 18/20 3PH (else 4P)
    { climate: 'hot', shape: '3PC', atLeast: 4 },
    { climate: 'subArctic', shape: '3PH', atLeast: 4 },
    { climate: 'temperate', shape: '5P', atLeast: 5 },
    { climate: 'mild', shape: '3PH', atLeast: 4 },
  ];
  for (const days of [730, 365]) {
    for (const { climate, shape, atLeast } of expectations) {
      it(`${climate}, ${days} days → ${shape}`, () => {
        const selected = SEEDS.map((seed) => analyse(CLIMATES[climate], SAMPLE_BUILDING, { daily: days }, seed));
        const names = selected.map((a) => a.choice.selected);
        expect(names.filter((name) => name === shape).length, names.join(' ')).toBeGreaterThanOrEqual(atLeast);
        for (const analysis of selected) {
          expect(analysis.periods).toHaveLength(days);
          expect(analysis.excluded).toEqual([]);
        }
      });
    }
  }

  it('temperate, 730 days: the 5P recovers the building (changepoints ±1.5 °F, slopes ±10%)', () => {
    // synthetic: the test sets the truth (55 °F, 68 °F, −8 and +10 kWh/day/°F, base 300)
    for (const seed of SEEDS) {
      const fit = selectedFit(analyse(CLIMATES.temperate, SAMPLE_BUILDING, { daily: 730 }, seed));
      expect(fit.model).toBe('5P');
      expect(Math.abs(fit.parameters.heatingChangepoint! - 55)).toBeLessThan(1.5);
      expect(Math.abs(fit.parameters.coolingChangepoint! - 68)).toBeLessThan(1.5);
      expect(Math.abs(fit.parameters.heatingSlope! / -8 - 1)).toBeLessThan(0.1);
      expect(Math.abs(fit.parameters.coolingSlope! / 10 - 1)).toBeLessThan(0.1);
      expect(Math.abs(fit.parameters.base! / 300 - 1)).toBeLessThan(0.03);
    }
  });

  it('hot and sub-arctic, 730 days: the one changepoint seen is the building’s own (±1.5 °F)', () => {
    // synthetic: the test sets the truth
    for (const seed of SEEDS) {
      const hot = analyse(CLIMATES.hot, SAMPLE_BUILDING, { daily: 730 }, seed);
      const cooling = hot.choice.candidates.find((c) => c.model === '3PC')!.fit!;
      expect(Math.abs(cooling.parameters.coolingChangepoint! - 68)).toBeLessThan(1.5);
      const cold = analyse(CLIMATES.subArctic, SAMPLE_BUILDING, { daily: 730 }, seed);
      const heating = cold.choice.candidates.find((c) => c.model === '3PH')!.fit!;
      expect(Math.abs(heating.parameters.heatingChangepoint! - 55)).toBeLessThan(1.5);
    }
  });
});

describe('monthly bills: the shape follows the weather seen (common practice)', () => {
  for (const months of [36, 24]) {
    it(`temperate, ${months} bills → 5P`, () => {
      // measured when written: 20/20 seeds for both lengths
      for (const seed of SEEDS) {
        const analysis = analyse(CLIMATES.temperate, SAMPLE_BUILDING, { monthly: months }, seed);
        expect(analysis.choice.selected, `seed ${seed}`).toBe('5P');
        expect(analysis.periods).toHaveLength(months);
      }
    });

    /**
     * Hot, sub-arctic and mild climates on monthly bills: only the branch the
     * weather showed (common practice). A bill whose days straddle a
     * changepoint has a mean temperature near it but some heating or cooling
     * in it, so the monthly signature bends smoothly instead of at a corner;
     * left alone, the F-test would prefer a same-signed 4P (measured over
     * seeds 1–20 before the screening rule: hot 4P 20/20, sub-arctic 17/20).
     * The default screening reads a same-signed 4P as one rounded branch
     * (choose.ts), so the one-branch shape is chosen.
     */
    it(`hot, ${months} bills → the cooling branch, and a heating branch only where its days show it`, () => {
      // The building heats below 55 °F; the hot climate has few such days, spread over a few winter
      // bills. Day-resolved, those days can support a weak heating branch (measured when written over seeds 1–20 and both lengths:
      // 5P on 1 of 40 seed-and-length runs, 3PC on the rest); the cooling branch is always found.
      for (const seed of SEEDS) {
        const fit = selectedFit(analyse(CLIMATES.hot, SAMPLE_BUILDING, { monthly: months }, seed));
        expect(['3PC', '5P'], `seed ${seed}`).toContain(fit.model);
        expect(branches(fit).cooling, `seed ${seed} ${JSON.stringify(fit.parameters)}`).toBe(true);
        // synthetic truth: cooling 10 per degree above 68 °F
        expect(fit.parameters.coolingSlope!, `seed ${seed}`).toBeGreaterThan(9);
        expect(fit.parameters.coolingSlope!, `seed ${seed}`).toBeLessThan(11);
        expect(Math.abs(fit.parameters.coolingChangepoint! - 68), `seed ${seed}`).toBeLessThan(1.5);
      }
    });

    it(`sub-arctic, ${months} bills → 3PH`, () => {
      for (const seed of SEEDS) {
        const fit = selectedFit(analyse(CLIMATES.subArctic, SAMPLE_BUILDING, { monthly: months }, seed));
        expect(fit.model, `seed ${seed}`).toBe('3PH');
        expect(branches(fit), `seed ${seed} ${JSON.stringify(fit.parameters)}`).toEqual({
          heating: true,
          cooling: false,
        });
      }
    });

    it(`mild (never reaches cooling), ${months} bills → 3PH`, () => {
      for (const seed of SEEDS) {
        const fit = selectedFit(analyse(CLIMATES.mild, SAMPLE_BUILDING, { monthly: months }, seed));
        expect(fit.model, `seed ${seed}`).toBe('3PH');
        expect(branches(fit), `seed ${seed} ${JSON.stringify(fit.parameters)}`).toEqual({
          heating: true,
          cooling: false,
        });
      }
    });
  }
});

describe('a building with no weather dependence → 1P (common practice)', () => {
  // measured over seeds 1–20 when written: 36 bills 19/20, 24 bills 20/20, 730 days 20/20, 365 days 18/20 (else 2P)
  const kinds: DataKind[] = [{ monthly: 36 }, { monthly: 24 }, { daily: 730 }, { daily: 365 }];
  for (const kind of kinds) {
    it(`temperate climate, ${describeKind(kind)}`, () => {
      const names = SEEDS.map((seed) => analyse(CLIMATES.temperate, WEATHER_INDEPENDENT, kind, seed).choice.selected);
      expect(names.filter((name) => name === '1P').length, names.join(' ')).toBeGreaterThanOrEqual(4);
    });
  }
});
