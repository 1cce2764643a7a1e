/**
 * Invented data for the engine's behavioural tests: a seeded random source,
 * an invented building whose daily use follows a heating–flat–cooling
 * signature, invented climates (a seasonal sine plus day-to-day noise), and
 * the readings such a building would produce under them. Everything here is
 * synthetic: the tests that use it set the truth.
 */
import { addDays, daysBetween } from '../../src/engine/dates.js';
import type { DailyTemperature, Period, Reading } from '../../src/engine/types.js';

export { seededRandom, type Random } from '../../src/lib/seeded-random.js';
import type { Random } from '../../src/lib/seeded-random.js';

/**
 * An invented building: use per day = base + heatingRate·(heatingBelow − T)₊
 * + coolingRate·(T − coolingAbove)₊. Rates are positive magnitudes (use per
 * day per degree); either may be 0 for a building without that load.
 */
export interface Building {
  base: number;
  heatingBelow: number;
  heatingRate: number;
  coolingAbove: number;
  coolingRate: number;
  /** Standard deviation of one day's use around the signature. */
  dailyNoise: number;
  /**
   * Lag-1 correlation of the day-to-day departures (occupancy and operation
   * run in spells, so a month's departures do not average away). 0 = independent days.
   */
  noisePersistence: number;
}

/** The building the scenario tests share: 300 kWh/day, heating below 55 °F, cooling above 68 °F. */
export const SAMPLE_BUILDING: Building = {
  base: 300,
  heatingBelow: 55,
  heatingRate: 8,
  coolingAbove: 68,
  coolingRate: 10,
  dailyNoise: 15,
  noisePersistence: 0,
};

/** The building's expected use on a day at temperature `temp` (no noise). */
export function signature(building: Building, temp: number): number {
  return (
    building.base +
    building.heatingRate * Math.max(building.heatingBelow - temp, 0) +
    building.coolingRate * Math.max(temp - building.coolingAbove, 0)
  );
}

/**
 * An invented climate: daily mean temperature = mean − amplitude·cos(2π(day − coldestDay)/365.25)
 * plus AR(1) day-to-day noise (weather runs in spells).
 */
export interface Climate {
  mean: number;
  amplitude: number;
  /** Standard deviation of the day-to-day departure from the seasonal curve. */
  dailySpread: number;
  /** Lag-1 correlation of those departures. */
  persistence: number;
  /** Day of year (0 = 1 Jan) of the seasonal minimum. */
  coldestDay: number;
}

export const CLIMATES = {
  /** Warm all year: its coolest months sit in the building's flat band, the rest need cooling. */
  hot: { mean: 74, amplitude: 14, dailySpread: 2.5, persistence: 0.6, coldestDay: 15 },
  /** Cold all year: heating most of the year, the flat band only in the short summer. */
  subArctic: { mean: 28, amplitude: 33, dailySpread: 2.5, persistence: 0.6, coldestDay: 20 },
  /** Cold winters and hot summers: heating, flat and cooling regions all seen. */
  temperate: { mean: 58, amplitude: 24, dailySpread: 4, persistence: 0.6, coldestDay: 18 },
  /** Mild all year, never warm enough to cool. */
  mild: { mean: 55, amplitude: 6, dailySpread: 2, persistence: 0.6, coldestDay: 15 },
} as const satisfies Record<string, Climate>;

/** Daily weather for `days` days from `start`, rounded to 0.1° as a station would report it. */
export function dailyWeather(climate: Climate, start: string, days: number, random: Random): DailyTemperature[] {
  const startDayOfYear = daysBetween(`${start.slice(0, 4)}-01-01`, start);
  const departures = ar1Series(days, climate.dailySpread, climate.persistence, random);
  return departures.map((departure, d) => {
    const temp = seasonalTemperature(climate, startDayOfYear + d) + departure;
    return { date: addDays(start, d), temp: Math.round(temp * 10) / 10 };
  });
}

/** The climate's seasonal curve on day `dayOfYear` (0 = 1 Jan; later years continue the count): no day-to-day weather. */
export function seasonalTemperature(climate: Climate, dayOfYear: number): number {
  return climate.mean - climate.amplitude * Math.cos((2 * Math.PI * (dayOfYear - climate.coldestDay)) / 365.25);
}

/**
 * A stationary AR(1) series: x₀ ~ N(0, sd²), xₜ = φ·xₜ₋₁ + sd·√(1 − φ²)·εₜ,
 * so every value has standard deviation `sd` and lag-1 correlation φ. Draws
 * length + 1 normals from `random` (the last one unused), in order.
 */
export function ar1Series(length: number, sd: number, persistence: number, random: Random): number[] {
  if (!(persistence > -1 && persistence < 1))
    throw new RangeError(`persistence must lie in (−1, 1), got ${persistence}`);
  const innovation = sd * Math.sqrt(1 - persistence * persistence);
  const series: number[] = [];
  let current = sd * random.normal();
  for (let i = 0; i < length; i++) {
    series.push(current);
    current = persistence * current + innovation * random.normal();
  }
  return series;
}

/** Day-to-day departures of use from the signature: AR(1) with the building's spread and persistence. */
function useDepartures(building: Building, days: number, random: Random): number[] {
  return ar1Series(days, building.dailyNoise, building.noisePersistence, random);
}

/** One reading per day: the building's use on that day's weather plus noise. */
export function dailyReadings(building: Building, weather: readonly DailyTemperature[], random: Random): Reading[] {
  const departures = useDepartures(building, weather.length, random);
  return weather.map((day, d) => ({
    start: day.date,
    end: addDays(day.date, 1),
    quantity: signature(building, day.temp) + departures[d]!,
  }));
}

/**
 * Monthly bills read on the first of each month: each bill is the sum of the
 * building's daily use (with daily noise) over [start, end). The weather must
 * cover every day of the bills.
 */
export function monthlyReadings(
  building: Building,
  weather: readonly DailyTemperature[],
  firstRead: string,
  months: number,
  random: Random,
): Reading[] {
  const byDate = new Map(weather.map((day) => [day.date, day.temp]));
  const readings: Reading[] = [];
  let start = firstRead;
  let end = firstRead;
  for (let m = 0; m < months; m++) end = nextMonth(end);
  const departures = useDepartures(building, daysBetween(firstRead, end), random);
  let dayIndex = 0;
  for (let m = 0; m < months; m++) {
    const end = nextMonth(start);
    let quantity = 0;
    for (let d = 0; d < daysBetween(start, end); d++) {
      const temp = byDate.get(addDays(start, d));
      if (temp === undefined) throw new RangeError(`no weather on ${addDays(start, d)}`);
      quantity += signature(building, temp) + departures[dayIndex++]!;
    }
    readings.push({ start, end, quantity });
    start = end;
  }
  return readings;
}

/** The same day of the next month for a first-of-month date. */
export function nextMonth(date: string): string {
  const year = Number(date.slice(0, 4));
  const month = Number(date.slice(5, 7));
  return month === 12 ? `${year + 1}-01-01` : `${year}-${String(month + 1).padStart(2, '0')}-01`;
}

/**
 * Aligned periods built directly from (temperature, use per day, days)
 * triples, bypassing weather: consecutive periods from `firstStart`, so their
 * time order is the order given.
 */
export function periodsFromPoints(
  points: readonly { temp: number; usePerDay: number; days: number }[],
  firstStart = '2030-01-01',
): Period[] {
  let start = firstStart;
  return points.map((point) => {
    const end = addDays(start, point.days);
    const period: Period = {
      start,
      end,
      days: point.days,
      quantity: point.usePerDay * point.days,
      usePerDay: point.usePerDay,
      meanTemp: point.temp,
      coverage: 1,
      estimated: false,
    };
    start = end;
    return period;
  });
}

/** Per-day use of a hinge signature: b0 + heating·(cH − x)₊ + cooling·(x − cC)₊ (rates as magnitudes). */
export function hinge(
  x: number,
  shape: { base: number; heatingBelow?: number; heatingRate?: number; coolingAbove?: number; coolingRate?: number },
): number {
  const heating = shape.heatingBelow === undefined ? 0 : (shape.heatingRate ?? 0) * Math.max(shape.heatingBelow - x, 0);
  const cooling = shape.coolingAbove === undefined ? 0 : (shape.coolingRate ?? 0) * Math.max(x - shape.coolingAbove, 0);
  return shape.base + heating + cooling;
}

/**
 * A fully covered period over `temps` (one per day, starting `startOffset`
 * days after 2030-01-01 unless `origin` says otherwise) with the given use
 * per day and variables: the engine's Period as the search and fits see it.
 */
export function periodOfDays(
  startOffset: number,
  temps: number[],
  usePerDay: number,
  variables?: Record<string, number>,
  origin = '2030-01-01',
): Period {
  const days = temps.length;
  return {
    start: addDays(origin, startOffset),
    end: addDays(origin, startOffset + days),
    days,
    quantity: usePerDay * days,
    usePerDay,
    meanTemp: temps.reduce((sum, t) => sum + t, 0) / days,
    coverage: 1,
    estimated: false,
    dayTemps: temps,
    ...(variables ? { variables } : {}),
  };
}
