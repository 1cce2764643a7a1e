/**
 * Invented buildings that answer each day's temperature. Four kinds, each
 * with its parameters drawn per building from a plausible range:
 *   - heating-dominated (gas-like): a small base, a steep heating slope below
 *     a changepoint of 55–60 °F, no cooling;
 *   - cooling-dominated (electric-like): a large base, cooling above 58–66 °F;
 *   - 5P (electric-like, heated and cooled): heating below 48–56 °F, a flat
 *     band 8–14 °F wide, cooling above it;
 *   - weather-free: use does not depend on the weather at all.
 * A day's use is the signature at the station's reported temperature plus
 * day-to-day noise (noise.ts), whose spread is a share of the building's
 * mean use over its climate's normal year.
 *
 * Synthetic: the simulation sets the truth. No real building.
 */
import type { ModelName } from '../../../src/engine/types.js';
import type { Random } from '../../../src/lib/seeded-random.js';
import { signature, type Building, type Climate } from '../synthetic.js';
import { normalYearTemperatures } from './climates.js';

export type Archetype = 'heating' | 'cooling' | 'fivePoint' | 'weatherFree';

export const ARCHETYPES: readonly Archetype[] = ['heating', 'cooling', 'fivePoint', 'weatherFree'];

/** Plain labels for tables. */
export const ARCHETYPE_LABELS: Readonly<Record<Archetype, string>> = {
  heating: 'heating-dominated',
  cooling: 'cooling-dominated',
  fivePoint: '5P',
  weatherFree: 'weather-free',
};

/** The shape each kind of building truly has (where its weather spans its changepoints). */
export const TRUE_SHAPE: Readonly<Record<Archetype, ModelName>> = {
  heating: '3PH',
  cooling: '3PC',
  fivePoint: '5P',
  weatherFree: '1P',
};

/** Gas-like meters heat; electric-like meters cool (and may heat as well). */
export const METER_CLASS: Readonly<Record<Archetype, 'gas-like' | 'electric-like' | 'weather-free'>> = {
  heating: 'gas-like',
  cooling: 'electric-like',
  fivePoint: 'electric-like',
  weatherFree: 'weather-free',
};

/**
 * A simulated building: the synthetic.ts building (signature, noise spread
 * `dailyNoise` and persistence `noisePersistence`) with its kind and the
 * share of its noise variance that comes from the station-wide shocks.
 */
export interface SimulatedBuilding extends Building {
  archetype: Archetype;
  /** Share (0..1) of the daily noise variance shared by every meter on the station. */
  stationShare: number;
  /** Daily noise spread as a share of the mean use over the climate's normal year (before `scale`). */
  relativeNoise: number;
}

export interface NoiseSpec {
  /** Lag-1 correlation φ of the day-to-day noise (0 = independent days). */
  persistence: number;
  /** Share of the noise variance from station-wide shocks (0..1); default 0. */
  stationShare?: number;
  /** Multiplier of the drawn noise spread: 0 = noise-free; default 1. */
  scale?: number;
}

/** Range of the daily noise spread, as a share of mean daily use: chosen for the simulation (it gives bills a CV(RMSE) of a few per cent with independent days). */
export const RELATIVE_NOISE_RANGE = { min: 0.06, max: 0.15 } as const;

/**
 * Draw one building of `archetype` for `climate`. Parameters are drawn in a
 * fixed order, the noise spread last, so the same random state gives the
 * same building whatever the noise spec.
 */
export function drawBuilding(
  archetype: Archetype,
  climate: Climate,
  noise: NoiseSpec,
  random: Random,
): SimulatedBuilding {
  const between = (min: number, max: number): number => min + (max - min) * random.uniform();
  let response: Pick<Building, 'base' | 'heatingBelow' | 'heatingRate' | 'coolingAbove' | 'coolingRate'>;
  switch (archetype) {
    case 'heating': {
      // Gas-like units (say therms/day): base 10–30, 3–8 per °F below 55–60 °F.
      response = {
        base: between(10, 30),
        heatingRate: between(3, 8),
        heatingBelow: between(55, 60),
        coolingRate: 0,
        coolingAbove: 65,
      };
      break;
    }
    case 'cooling': {
      // Electric-like units (kWh/day): base 400–1,500, 2–5% of base per °F above 58–66 °F.
      const base = between(400, 1500);
      response = {
        base,
        heatingRate: 0,
        heatingBelow: 55,
        coolingRate: base * between(0.02, 0.05),
        coolingAbove: between(58, 66),
      };
      break;
    }
    case 'fivePoint': {
      const base = between(400, 1500);
      const heatingBelow = between(48, 56);
      response = {
        base,
        heatingRate: base * between(0.01, 0.03),
        heatingBelow,
        coolingAbove: heatingBelow + between(8, 14),
        coolingRate: base * between(0.02, 0.05),
      };
      break;
    }
    case 'weatherFree': {
      response = { base: between(100, 1500), heatingRate: 0, heatingBelow: 55, coolingRate: 0, coolingAbove: 65 };
      break;
    }
  }
  const relativeNoise = between(RELATIVE_NOISE_RANGE.min, RELATIVE_NOISE_RANGE.max);
  const stationShare = noise.stationShare ?? 0;
  if (!(stationShare >= 0 && stationShare <= 1))
    throw new RangeError(`stationShare must lie in [0, 1], got ${stationShare}`);
  const shell: Building = { ...response, dailyNoise: 0, noisePersistence: noise.persistence };
  const normalUse = meanNormalYearUse(shell, climate);
  return {
    ...shell,
    archetype,
    stationShare,
    relativeNoise,
    dailyNoise: relativeNoise * normalUse * (noise.scale ?? 1),
  };
}

/** Mean use per day over the climate's normal year (the seasonal curve, no spells). */
export function meanNormalYearUse(building: Building, climate: Climate): number {
  const temps = normalYearTemperatures(climate);
  return temps.reduce((total, temp) => total + signature(building, temp), 0) / temps.length;
}
