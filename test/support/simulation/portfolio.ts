/**
 * A portfolio on one station: several meters read on the same dates, seeing
 * the same weather and sharing a part of their day-to-day noise (the
 * station's shocks), so their bill residuals correlate with the chosen
 * intra-class correlation.
 */
import type { DailyTemperature } from '../../../src/engine/types.js';
import { seededRandom } from '../../../src/lib/seeded-random.js';
import type { Climate } from '../synthetic.js';
import { drawBuilding, type Archetype } from './buildings.js';
import { simulateMeter, type SimulatedMeter } from './meter.js';
import { makeStation } from './station.js';
import { planStudy, type StudyDesign, type StudyPlan } from './study.js';

export interface PortfolioRequest {
  climate: Climate;
  /** One archetype per meter. */
  archetypes: readonly Archetype[];
  /** Intra-class correlation of the meters' noise (the station share of its variance), 0..1. */
  intraClassCorrelation: number;
  /** Persistence φ of every meter's noise and of the station's shocks. */
  persistence: number;
  design: StudyDesign;
  seed: number;
}

export interface SimulatedPortfolio {
  plan: StudyPlan;
  weather: DailyTemperature[];
  meters: SimulatedMeter[];
}

/** Plan, station (weather, then shocks), then each meter's building and noise, in order, from one seed. */
export function simulatePortfolio(request: PortfolioRequest): SimulatedPortfolio {
  const random = seededRandom(request.seed);
  const plan = planStudy(request.design, random);
  const shared = request.intraClassCorrelation > 0 ? { persistence: request.persistence } : undefined;
  const station = makeStation(request.climate, plan.start, plan.days, random, shared);
  const meters = request.archetypes.map((archetype) => {
    const building = drawBuilding(
      archetype,
      request.climate,
      { persistence: request.persistence, stationShare: request.intraClassCorrelation },
      random,
    );
    return simulateMeter(building, station, plan, random);
  });
  return { plan, weather: station.weather, meters };
}
