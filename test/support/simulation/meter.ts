/**
 * One simulated meter on a station: each day's use is the building's
 * signature at the station's reported temperature (the simulation has no
 * truer temperature than the one the station reports) plus the meter's
 * noise; the readings sum it over the plan's read dates. No retrofit unless
 * asked, so the true saving is 0; with a retrofit, every reporting day's
 * expected use falls by the stated share and the true saving is that share
 * of the expected use.
 */
import { daysBetween } from '../../../src/engine/dates.js';
import type { Reading } from '../../../src/engine/types.js';
import type { Random } from '../../../src/lib/seeded-random.js';
import { signature } from '../synthetic.js';
import type { SimulatedBuilding } from './buildings.js';
import { readingsFromDailyUse } from './billing.js';
import { meterNoise } from './noise.js';
import type { Station } from './station.js';
import type { StudyPlan } from './study.js';

export interface SimulatedMeter {
  building: SimulatedBuilding;
  baseline: Reading[];
  reporting: Reading[];
  /** Expected (noise-free) use of each day from the plan's start, after any retrofit. */
  expectedUse: number[];
  /** The noise added to each day. */
  noise: number[];
  /** What the measures truly saved over the reporting readings (0 without a retrofit). */
  trueSavings: number;
}

export interface MeterOptions {
  /** Share of expected use the measures take off every reporting day (default none). */
  retrofit?: { shareSaved: number };
}

/** The meter's readings over the plan. Draws only the meter's own noise from `random`. */
export function simulateMeter(
  building: SimulatedBuilding,
  station: Station,
  plan: StudyPlan,
  random: Random,
  options: MeterOptions = {},
): SimulatedMeter {
  const offset = daysBetween(station.start, plan.start);
  if (offset < 0 || offset + plan.days > station.weather.length)
    throw new RangeError('the station weather does not cover the study');
  const temps = station.weather.slice(offset, offset + plan.days).map((day) => day.temp);
  const shocks = station.shocks ? station.shocks.slice(offset, offset + plan.days) : null;
  const noise = meterNoise(building, plan.days, random, shocks);
  const shareSaved = options.retrofit?.shareSaved ?? 0;
  const reportingFrom = plan.reportingReads.length > 0 ? daysBetween(plan.start, plan.reportingReads[0]!) : plan.days;
  let trueSavings = 0;
  const expectedUse = temps.map((temp, d) => {
    const use = signature(building, temp);
    if (d < reportingFrom || shareSaved === 0) return use;
    trueSavings += use * shareSaved;
    return use * (1 - shareSaved);
  });
  const dailyUse = expectedUse.map((use, d) => use + noise[d]!);
  return {
    building,
    baseline: readingsFromDailyUse(plan.baselineReads, plan.start, dailyUse),
    reporting: readingsFromDailyUse(plan.reportingReads, plan.start, dailyUse),
    expectedUse,
    noise,
    trueSavings,
  };
}
