/**
 * Writes the example data for an invented site, the Orlenby Community
 * Library in the invented town of Orlenby (no real place or building):
 *
 *   weather.csv    daily mean temperature (°F), 2022-01-01 .. 2025-06-30
 *   baseline.csv   24 monthly electricity bills (kWh), 2022-01-01 .. 2024-01-01
 *   reporting.csv  12 monthly bills for 2024, after the retrofit (~12% less use)
 *
 * Everything is synthetic and deterministic (a seeded generator), so running
 *   npx tsx examples/make-examples.ts
 * again rewrites the same files byte for byte.
 */
import { writeFileSync } from 'node:fs';
import { seededRandom } from '../src/lib/seeded-random.js';

const MS_PER_DAY = 86_400_000;
const OUTPUT = new URL('./', import.meta.url);

function dayNumber(date: string): number {
  return Date.parse(`${date}T00:00:00Z`) / MS_PER_DAY;
}

function isoDate(day: number): string {
  return new Date(day * MS_PER_DAY).toISOString().slice(0, 10);
}

function monthStart(year: number, monthIndex: number): string {
  return isoDate(Date.UTC(year, monthIndex, 1) / MS_PER_DAY);
}

// ---- Weather: a seasonal cycle (coldest late January) plus day-to-day
// persistence (AR(1) noise), in the range of a temperate inland town.
const normal = seededRandom(20220101).normal;
const firstDay = dayNumber('2022-01-01');
const lastDay = dayNumber('2025-06-30');
const temperatures = new Map<string, number>();
let anomaly = 0;
for (let day = firstDay; day <= lastDay; day++) {
  const dayOfYear = day - dayNumber(`${isoDate(day).slice(0, 4)}-01-01`);
  const seasonal = 53 - 25 * Math.cos((2 * Math.PI * (dayOfYear - 22)) / 365.25);
  anomaly = 0.7 * anomaly + 5 * normal();
  temperatures.set(isoDate(day), Math.round((seasonal + anomaly) * 10) / 10);
}

// ---- The library's use per day: a base load, heating below 55 °F and
// cooling above 67 °F, evaluated day by day (so each bill sees its own days).
const BASE_KWH_PER_DAY = 640;
const HEATING_KWH_PER_DEGREE_DAY = 21;
const COOLING_KWH_PER_DEGREE_DAY = 34;
function usePerDay(temp: number): number {
  return (
    BASE_KWH_PER_DAY +
    HEATING_KWH_PER_DEGREE_DAY * Math.max(55 - temp, 0) +
    COOLING_KWH_PER_DEGREE_DAY * Math.max(temp - 67, 0)
  );
}

const RATE_PER_KWH = 0.14; // invented tariff, only to show that extra columns are ignored
const billNoise = seededRandom(424242).normal;

function bills(fromYear: number, months: number, useFactor: number): string[] {
  const rows = ['start,end,quantity,cost,estimated'];
  for (let k = 0; k < months; k++) {
    const start = monthStart(fromYear, k);
    const end = monthStart(fromYear, k + 1);
    let quantity = 0;
    for (let day = dayNumber(start); day < dayNumber(end); day++)
      quantity += usePerDay(temperatures.get(isoDate(day))!);
    quantity = Math.round(quantity * useFactor * (1 + 0.03 * billNoise()));
    // One estimated read per year, as utilities sometimes send.
    const estimated = k % 12 === 7 ? 'yes' : '';
    rows.push(`${start},${end},${quantity},${(quantity * RATE_PER_KWH).toFixed(2)},${estimated}`);
  }
  return rows;
}

const weatherRows = ['date,temp', ...[...temperatures].map(([date, temp]) => `${date},${temp.toFixed(1)}`)];
writeFileSync(new URL('weather.csv', OUTPUT), `${weatherRows.join('\n')}\n`);
writeFileSync(new URL('baseline.csv', OUTPUT), `${bills(2022, 24, 1).join('\n')}\n`);
writeFileSync(new URL('reporting.csv', OUTPUT), `${bills(2024, 12, 0.88).join('\n')}\n`);
