/**
 * One meter's whole study in one call: the plan, its own station's weather,
 * a building drawn for the climate, and the readings, all from one seed in
 * a fixed order (plan, weather, building, noise). The same seed with a
 * different noise spec gives the same plan, weather and building; only the
 * noise changes (so a noise-free run shows the model-form error of the very
 * meters of the noisy run).
 */
import type { DailyTemperature } from '../../../src/engine/types.js';
import { seededRandom } from '../../../src/lib/seeded-random.js';
import type { Climate } from '../synthetic.js';
import { drawBuilding, type Archetype, type NoiseSpec } from './buildings.js';
import { simulateMeter, type MeterOptions, type SimulatedMeter } from './meter.js';
import { makeStation } from './station.js';
import { planStudy, type StudyDesign, type StudyPlan } from './study.js';

export interface MeterStudyRequest extends MeterOptions {
  archetype: Archetype;
  climate: Climate;
  noise: NoiseSpec;
  design: StudyDesign;
  seed: number;
}

export interface MeterStudy extends SimulatedMeter {
  plan: StudyPlan;
  weather: DailyTemperature[];
}

export function simulateMeterStudy(request: MeterStudyRequest): MeterStudy {
  const random = seededRandom(request.seed);
  const plan = planStudy(request.design, random);
  const station = makeStation(request.climate, plan.start, plan.days, random);
  const building = drawBuilding(request.archetype, request.climate, request.noise, random);
  const meter = simulateMeter(building, station, plan, random, request);
  return { ...meter, plan, weather: station.weather };
}
