/**
 * Shared helpers of the CLI tests: run main() in-process, write CSV files to
 * a temporary folder, and build small synthetic data sets whose truth the
 * tests set themselves.
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { DailyTemperature, Reading } from '../../src/engine/index.js';
import { main } from '../../src/cli/main.js';

export interface CliRun {
  code: number;
  stdout: string;
  stderr: string;
}

export async function runCli(args: string[]): Promise<CliRun> {
  let stdout = '';
  let stderr = '';
  const code = await main(args, {
    stdout: (text) => {
      stdout += text;
    },
    stderr: (text) => {
      stderr += text;
    },
  });
  return { code, stdout, stderr };
}

/** A temporary folder for one test file; call `remove` in afterAll. */
export function makeTempFolder(): {
  path: (name: string) => string;
  write: (name: string, text: string) => string;
  remove: () => void;
} {
  const folder = mkdtempSync(join(tmpdir(), 'mvledger-cli-'));
  return {
    path: (name) => join(folder, name),
    write: (name, text) => {
      const file = join(folder, name);
      writeFileSync(file, text);
      return file;
    },
    remove: () => rmSync(folder, { recursive: true, force: true }),
  };
}

const MS_PER_DAY = 86_400_000;

function isoDate(day: number): string {
  return new Date(day * MS_PER_DAY).toISOString().slice(0, 10);
}

function dayNumber(date: string): number {
  return Date.parse(`${date}T00:00:00Z`) / MS_PER_DAY;
}

/** Synthetic daily mean temperatures (°F): a seasonal cycle plus a fixed wiggle, one decimal. */
export function syntheticWeather(from = '2022-01-01', days = 1096): DailyTemperature[] {
  const first = dayNumber(from);
  return Array.from({ length: days }, (_, d) => {
    const temp = 52 - 24 * Math.cos((2 * Math.PI * (d - 20)) / 365.25) + 6 * Math.sin(d * 1.7);
    return { date: isoDate(first + d), temp: Math.round(temp * 10) / 10 };
  });
}

/** Use per day of the synthetic building: base 500, heating below 55 °F, cooling above 68 °F. */
export function syntheticUsePerDay(temp: number): number {
  return 500 + 12 * Math.max(55 - temp, 0) + 15 * Math.max(temp - 68, 0);
}

/** Monthly bills from `fromYear` over `months`, scaled by `factor`, with a fixed ±3% wiggle. */
export function syntheticBills(
  weather: readonly DailyTemperature[],
  fromYear: number,
  months: number,
  factor = 1,
): Reading[] {
  const byDate = new Map(weather.map((d) => [d.date, d.temp]));
  return Array.from({ length: months }, (_, k) => {
    const start = isoDate(Date.UTC(fromYear, k, 1) / MS_PER_DAY);
    const end = isoDate(Date.UTC(fromYear, k + 1, 1) / MS_PER_DAY);
    let quantity = 0;
    for (let day = dayNumber(start); day < dayNumber(end); day++)
      quantity += syntheticUsePerDay(byDate.get(isoDate(day)) ?? 50);
    return { start, end, quantity: Math.round(quantity * factor * (1 + 0.03 * Math.sin(k * 2.3))) };
  });
}

export function readingsCsv(readings: readonly Reading[]): string {
  return ['start,end,quantity', ...readings.map((r) => `${r.start},${r.end},${r.quantity}`)].join('\n') + '\n';
}

export function weatherCsv(weather: readonly DailyTemperature[]): string {
  return ['date,temp', ...weather.map((d) => `${d.date},${d.temp}`)].join('\n') + '\n';
}

/** The engine's document as --json must print it (JSON turns non-finite numbers into null). */
export function asJson(document: unknown): unknown {
  return JSON.parse(JSON.stringify(document));
}
