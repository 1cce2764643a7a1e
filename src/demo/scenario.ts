/**
 * The demo scenario, wholly invented: the Quillfen school district (a
 * fictional district) with three schools, an electricity and a gas meter
 * each, daily weather from an invented valley station, two baseline years
 * (2023–2024) of monthly bills and a reporting year (2025) after an invented
 * retrofit. Deterministic: the same seed gives the same data.
 */
import { addDays, daysBetween, dayTypesOver, type FacilityCalendar } from '../engine/index.js';
import { seededRandom } from '../lib/seeded-random.js';

export interface DemoUse {
  /** Use per day in the flat band. */
  base: number;
  heatingBelow?: number;
  heatingRate?: number;
  coolingAbove?: number;
  coolingRate?: number;
  /** Day-to-day noise, as a share of the day's use. */
  noise: number;
}

export interface DemoMeter {
  name: string;
  fuel: 'electricity' | 'natural-gas';
  unit: string;
  use: DemoUse;
  /** Share of use saved in the reporting year by the invented retrofit. */
  reportingSaving: number;
  /** Invented tariff, for the demo's cost column and contract rates (currency per unit). */
  price: number;
  /** Invented yearly escalation of the contract rate. */
  escalation: number;
  /**
   * An invented non-routine change in the reporting year: extra use per day
   * the weather model cannot see, and the engineer's standard uncertainty of
   * its total (the demo's adjustment states its own ±).
   */
  change?: { start: string; end: string; perDay: number; reason: string; uncertainty?: number };
}

export interface DemoFacility {
  name: string;
  address: string;
  floorArea: number;
  meters: DemoMeter[];
  /** Invented guarantee for contract year 1, as a share of the savings the scenario builds in. */
  guaranteeShare: number;
}

export const DEMO_DISTRICT = 'Quillfen School District (invented)';
export const DEMO_STATION = 'Quillfen Valley weather station (invented)';
export const WEATHER_START = '2023-01-01';
export const WEATHER_END = '2026-01-01';
export const BASELINE_START = '2023-01-01';
export const BASELINE_END = '2025-01-01';
export const REPORTING_END = '2026-01-01';
export const CONTRACT_START = '2025-01-01';
export const CONTRACT_YEARS = 10;
export const CONTRACT_CURRENCY = 'USD';
/** The quarter the demo prints its report for: the last full quarter of reporting data. */
export const DEMO_QUARTER = '2025-Q4';

export const DEMO_FACILITIES: DemoFacility[] = [
  {
    name: 'Quillfen Primary School',
    address: '1 Fernlow Lane, Quillfen (invented)',
    floorArea: 4200,
    guaranteeShare: 0.75,
    meters: [
      {
        name: 'Main electricity',
        fuel: 'electricity',
        unit: 'kWh',
        use: { base: 900, coolingAbove: 68, coolingRate: 45, noise: 0.05 },
        reportingSaving: 0.12,
        price: 0.16,
        escalation: 0.03,
      },
      {
        name: 'Boiler gas',
        fuel: 'natural-gas',
        unit: 'therm',
        use: { base: 18, heatingBelow: 58, heatingRate: 6, noise: 0.06 },
        reportingSaving: 0.15,
        price: 1.1,
        escalation: 0.02,
      },
    ],
  },
  {
    name: 'Marrowick Middle School',
    address: '40 Cobbler Rise, Quillfen (invented)',
    floorArea: 7800,
    guaranteeShare: 0.6,
    meters: [
      {
        name: 'Main electricity',
        fuel: 'electricity',
        unit: 'kWh',
        use: { base: 1500, heatingBelow: 48, heatingRate: 14, coolingAbove: 70, coolingRate: 70, noise: 0.05 },
        reportingSaving: 0.09,
        price: 0.15,
        escalation: 0.03,
        // 260 a day over 122 days is 31,720 kWh; the invented engineer puts its total at ± 4,800 kWh (about 15%).
        change: {
          start: '2025-09-01',
          end: '2026-01-01',
          perDay: 260,
          reason: 'New after-school sports hall opened in September (invented)',
          uncertainty: 4800,
        },
      },
      {
        name: 'Boiler gas',
        fuel: 'natural-gas',
        unit: 'therm',
        use: { base: 25, heatingBelow: 60, heatingRate: 8, noise: 0.06 },
        reportingSaving: 0.11,
        price: 1.05,
        escalation: 0.02,
      },
    ],
  },
  {
    name: 'Brindlecombe High School',
    address: '7 Orchard Steps, Quillfen (invented)',
    floorArea: 12500,
    guaranteeShare: 1.15,
    meters: [
      {
        name: 'Main electricity',
        fuel: 'electricity',
        unit: 'kWh',
        use: { base: 2500, coolingAbove: 66, coolingRate: 110, noise: 0.05 },
        reportingSaving: 0.14,
        price: 0.15,
        escalation: 0.03,
      },
      {
        name: 'Boiler gas',
        fuel: 'natural-gas',
        unit: 'therm',
        use: { base: 40, heatingBelow: 57, heatingRate: 12, noise: 0.06 },
        reportingSaving: 0.1,
        price: 1.05,
        escalation: 0.02,
      },
    ],
  },
];

/** The invented valley's seasonal cycle (°F) on day `d` counted from 1 January. */
function seasonalTemp(d: number): number {
  return 54 - 24 * Math.cos((2 * Math.PI * (d - 15)) / 365.25);
}

/** The invented valley's normal year: its seasonal cycle without weather spells, 365 days. */
export function demoNormalYear(days: readonly string[]): { day: string; temp: number }[] {
  return days.map((day, d) => ({ day, temp: Math.round(seasonalTemp(d) * 10) / 10 }));
}

/** Daily mean temperatures (°F): a seasonal cycle with weather spells. */
export function demoWeather(seed = 2023): { date: string; temp: number }[] {
  const random = seededRandom(seed);
  const days = daysBetween(WEATHER_START, WEATHER_END);
  const out: { date: string; temp: number }[] = [];
  let spell = 0;
  for (let d = 0; d < days; d++) {
    spell = 0.7 * spell + 4.5 * random.normal();
    const seasonal = seasonalTemp(d);
    out.push({ date: addDays(WEATHER_START, d), temp: Math.round((seasonal + spell) * 10) / 10 });
  }
  return out;
}

function usePerDay(use: DemoUse, temp: number): number {
  let value = use.base;
  if (use.heatingBelow !== undefined && temp < use.heatingBelow)
    value += (use.heatingRate ?? 0) * (use.heatingBelow - temp);
  if (use.coolingAbove !== undefined && temp > use.coolingAbove)
    value += (use.coolingRate ?? 0) * (temp - use.coolingAbove);
  return value;
}

export interface DemoBill {
  start: string;
  end: string;
  quantity: number;
  cost: number;
}

/**
 * Monthly bills from `from` to `to`, read on an irregular day early in each
 * month (as meter readers do), each the sum of simulated days.
 */
export function demoBills(
  meter: DemoMeter,
  weather: ReadonlyMap<string, number>,
  from: string,
  to: string,
  saving: number,
  seed: number,
): DemoBill[] {
  const random = seededRandom(seed);
  const bills: DemoBill[] = [];
  let start = from;
  while (start < to) {
    const [year, month] = [Number(start.slice(0, 4)), Number(start.slice(5, 7))];
    const next = new Date(Date.UTC(year, month, 1 + random.integer(0, 3))).toISOString().slice(0, 10);
    const end = next > to ? to : next;
    let quantity = 0;
    for (let d = 0; d < daysBetween(start, end); d++) {
      const date = addDays(start, d);
      const temp = weather.get(date)!;
      const change =
        saving > 0 && meter.change && date >= meter.change.start && date < meter.change.end ? meter.change.perDay : 0;
      const day = usePerDay(meter.use, temp) * (1 - saving) + change;
      quantity += day * (1 + meter.use.noise * random.normal());
    }
    const rounded = Math.round(quantity);
    bills.push({ start, end, quantity: rounded, cost: Math.round(rounded * meter.price * 100) / 100 });
    start = end;
  }
  return bills;
}

/** The use the invented retrofit takes away over [from, to), in the meter's unit (the truth the demo's guarantee is set from). */
export function demoBuiltInSavings(
  meter: DemoMeter,
  weather: ReadonlyMap<string, number>,
  from: string,
  to: string,
): number {
  let total = 0;
  for (let d = 0; d < daysBetween(from, to); d++)
    total += usePerDay(meter.use, weather.get(addDays(from, d))!) * meter.reportingSaving;
  return total;
}

/**
 * The demo's case for a calendar: an invented early-years centre whose
 * electricity falls in its breaks and at weekends, whatever the weather.
 * Its 2025 summer break runs two weeks longer than the baseline years'
 * (an invented change of term dates), so a weather-only baseline books the
 * extra closed days as savings; with the calendar's day types it does not.
 */
export const CALENDAR_DEMO = {
  facility: { name: 'Quillfen Early Years Centre', address: '3 Millrace Walk, Quillfen (invented)', floorArea: 1600 },
  meter: {
    name: 'Main electricity',
    fuel: 'electricity',
    unit: 'kWh',
    use: { base: 620, heatingBelow: 45, heatingRate: 6, coolingAbove: 66, coolingRate: 38, noise: 0.04 },
    reportingSaving: 0.08,
    price: 0.16,
    escalation: 0.03,
  } satisfies DemoMeter,
  /** Use on each day type as a share of a term day's (invented). */
  dayTypeShare: { term: 1, weekend: 0.55, break: 0.35 } as Record<string, number>,
  calendar: {
    dayTypes: ['term', 'weekend', 'break'],
    weekly: ['term', 'term', 'term', 'term', 'term', 'weekend', 'weekend'],
    exceptions: [
      { start: '2023-07-24', end: '2023-09-04', dayType: 'break', note: 'summer break (invented)' },
      { start: '2023-12-21', end: '2024-01-03', dayType: 'break', note: 'winter break (invented)' },
      { start: '2024-07-22', end: '2024-09-02', dayType: 'break', note: 'summer break (invented)' },
      { start: '2024-12-20', end: '2025-01-06', dayType: 'break', note: 'winter break (invented)' },
      { start: '2025-07-07', end: '2025-09-01', dayType: 'break', note: 'summer break, two weeks longer (invented)' },
      { start: '2025-12-19', end: '2026-01-05', dayType: 'break', note: 'winter break (invented)' },
    ],
  } satisfies FacilityCalendar,
};

/** The calendar demo's monthly bills: each day's weather response scaled by its day type's share. */
export function calendarDemoBills(
  weather: ReadonlyMap<string, number>,
  from: string,
  to: string,
  saving: number,
  seed: number,
): DemoBill[] {
  const { meter, dayTypeShare, calendar } = CALENDAR_DEMO;
  const types = dayTypesOver(calendar, from, to);
  const random = seededRandom(seed);
  const bills: DemoBill[] = [];
  let start = from;
  while (start < to) {
    const [year, month] = [Number(start.slice(0, 4)), Number(start.slice(5, 7))];
    const next = new Date(Date.UTC(year, month, 1 + random.integer(0, 3))).toISOString().slice(0, 10);
    const end = next > to ? to : next;
    let quantity = 0;
    for (let d = 0; d < daysBetween(start, end); d++) {
      const date = addDays(start, d);
      const share = dayTypeShare[types[daysBetween(from, date)]!]!;
      quantity +=
        usePerDay(meter.use, weather.get(date)!) * share * (1 - saving) * (1 + meter.use.noise * random.normal());
    }
    const rounded = Math.round(quantity);
    bills.push({ start, end, quantity: rounded, cost: Math.round(rounded * meter.price * 100) / 100 });
    start = end;
  }
  return bills;
}

/** The use the calendar demo's retrofit takes away over [from, to) (the truth its figures are compared with). */
export function calendarDemoBuiltInSavings(weather: ReadonlyMap<string, number>, from: string, to: string): number {
  const { meter, dayTypeShare, calendar } = CALENDAR_DEMO;
  const types = dayTypesOver(calendar, from, to);
  let total = 0;
  for (let d = 0; d < daysBetween(from, to); d++)
    total += usePerDay(meter.use, weather.get(addDays(from, d))!) * dayTypeShare[types[d]!]! * meter.reportingSaving;
  return total;
}
