/**
 * Invented benchmark data: one made-up building whose use per day heats
 * below about 55 °F, stays flat in between and cools above about 68 °F, in a
 * made-up climate with continuous (unrounded) daily temperatures. The data
 * come out as engine Periods built the way alignPeriods builds them (full
 * weather coverage); the raw readings and weather can be kept too, so a run
 * can confirm alignPeriods sees the same thing.
 *
 * Synthetic: the benchmark sets the truth. No real building, place or climate.
 */
import type { DailyTemperature, Period, Reading } from '../../src/engine/index.js';
import { seededRandom, type SeededRandom } from './seeded-random.js';

export interface InventedBuilding {
  /** Use per day in the flat band (kWh/day). */
  baseUsePerDay: number;
  /** °F; below it use rises by `heatingSlope` per degree colder. */
  heatingChangepoint: number;
  heatingSlope: number;
  /** °F; above it use rises by `coolingSlope` per degree warmer. */
  coolingChangepoint: number;
  coolingSlope: number;
  /** Standard deviation of each day's use around the shape (kWh/day). */
  dailyNoise: number;
}

/** The one invented building of the single-meter measurements. */
export const BENCH_BUILDING: InventedBuilding = {
  baseUsePerDay: 1200,
  heatingChangepoint: 55,
  heatingSlope: 22,
  coolingChangepoint: 68,
  coolingSlope: 38,
  dailyNoise: 90,
};

/** Invented climate: a seasonal swing plus persistent day-to-day weather (°F). */
const CLIMATE = { annualMean: 58, seasonalSwing: 21, weatherNoise: 5, persistence: 0.7, coldestDayOfYear: 15 };

const MS_PER_DAY = 86_400_000;

function dayNumber(isoDate: string): number {
  return Date.parse(`${isoDate}T00:00:00Z`) / MS_PER_DAY;
}

function isoDate(day: number): string {
  return new Date(day * MS_PER_DAY).toISOString().slice(0, 10);
}

function trueUsePerDay(building: InventedBuilding, temp: number): number {
  return (
    building.baseUsePerDay +
    building.heatingSlope * Math.max(building.heatingChangepoint - temp, 0) +
    building.coolingSlope * Math.max(temp - building.coolingChangepoint, 0)
  );
}

function dailyTemperatures(random: SeededRandom, firstDay: number, count: number): number[] {
  const temps: number[] = [];
  let anomaly = 0;
  for (let d = 0; d < count; d++) {
    const yearAngle = (2 * Math.PI * (firstDay + d - CLIMATE.coldestDayOfYear)) / 365.25;
    anomaly = CLIMATE.persistence * anomaly + CLIMATE.weatherNoise * random.normal();
    temps.push(CLIMATE.annualMean - CLIMATE.seasonalSwing * Math.cos(yearAngle) + anomaly);
  }
  return temps;
}

export interface SyntheticMeter {
  periods: Period[];
  /** Present only when asked for (they cost memory across thousands of meters). */
  readings?: Reading[];
  weather?: DailyTemperature[];
}

interface MeterOptions {
  building?: InventedBuilding;
  keepRawData?: boolean;
}

/**
 * Periods of `lengths` days each, back to back from `firstDate`. Every day's
 * use is the building's shape at that day's temperature plus noise; a
 * period's quantity is the sum over its days.
 */
function meterFromPeriodLengths(
  random: SeededRandom,
  firstDate: string,
  lengths: readonly number[],
  options: MeterOptions,
): SyntheticMeter {
  const building = options.building ?? BENCH_BUILDING;
  const firstDay = dayNumber(firstDate);
  const totalDays = lengths.reduce((sum, days) => sum + days, 0);
  const temps = dailyTemperatures(random, firstDay, totalDays);
  const periods: Period[] = [];
  const readings: Reading[] = [];
  let day = 0;
  for (const days of lengths) {
    let quantity = 0;
    let tempSum = 0;
    for (let d = day; d < day + days; d++) {
      const temp = temps[d]!;
      tempSum += temp;
      quantity += trueUsePerDay(building, temp) + building.dailyNoise * random.normal();
    }
    const start = isoDate(firstDay + day);
    const end = isoDate(firstDay + day + days);
    periods.push({
      start,
      end,
      days,
      quantity,
      usePerDay: quantity / days,
      meanTemp: tempSum / days,
      coverage: 1,
      estimated: false,
    });
    if (options.keepRawData) readings.push({ start, end, quantity });
    day += days;
  }
  if (!options.keepRawData) return { periods };
  const weather = temps.map((temp, d) => ({ date: isoDate(firstDay + d), temp }));
  return { periods, readings, weather };
}

/** 36 monthly bills of 28–33 days from early 2021. */
export function monthlyMeter(seed: number, options: MeterOptions = {}): SyntheticMeter {
  const random = seededRandom(seed);
  const lengths = Array.from({ length: 36 }, () => random.integer(28, 33));
  return meterFromPeriodLengths(random, '2021-01-05', lengths, options);
}

/** 1,096 daily readings: 2020-01-01 up to 2023-01-01 (a leap year included). */
export function dailyMeter(seed: number, options: MeterOptions = {}): SyntheticMeter {
  const random = seededRandom(seed);
  const lengths = new Array<number>(1096).fill(1);
  return meterFromPeriodLengths(random, '2020-01-01', lengths, options);
}

/**
 * A variation of the bench building for the many-meter refit: changepoints
 * moved by up to ±2 °F, base use and slopes scaled by 0.8–1.2, so no two
 * meters share their data.
 */
export function variedBuilding(seed: number): InventedBuilding {
  const random = seededRandom(seed ^ 0x5bd1e995);
  const scale = (): number => 0.8 + 0.4 * random.uniform();
  const shift = (): number => -2 + 4 * random.uniform();
  return {
    baseUsePerDay: BENCH_BUILDING.baseUsePerDay * scale(),
    heatingChangepoint: BENCH_BUILDING.heatingChangepoint + shift(),
    heatingSlope: BENCH_BUILDING.heatingSlope * scale(),
    coolingChangepoint: BENCH_BUILDING.coolingChangepoint + shift(),
    coolingSlope: BENCH_BUILDING.coolingSlope * scale(),
    dailyNoise: BENCH_BUILDING.dailyNoise * scale(),
  };
}
