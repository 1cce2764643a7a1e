/**
 * Weather import benchmark (npm run bench:weather, and part of npm run
 * bench): 30 years of one station's daily record (1991–2020, about 11,000
 * days) as a GHCN-Daily .dly file constructed to the published layout (NOAA
 * NCEI GHCN-Daily readme.txt, section III: ID, YEAR, MONTH, ELEMENT, then 31
 * × VALUE/MFLAG/QFLAG/SFLAG; TMAX and TMIN in tenths of °C, −9999 missing)
 * with invented values and an invented station id, imported end to end
 * through POST /v1/weather-stations/{id}/imports into a new station each
 * run; beside it, in the same run, the plain reference: the same days posted
 * as JSON observations (PUT /v1/weather-stations/{id}/observations with
 * tmin/tmax) into a new station. The service runs in its own process on
 * loopback, on a fresh SQLite file and, when a server answers, on a fresh
 * PostgreSQL schema. Medians of RUNS runs each. Target: ≤ 1 s per import.
 * Prints a table and writes results/weather-import-latest.json.
 */
import type { ChildProcess } from 'node:child_process';
import { mkdirSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { performance } from 'node:perf_hooks';
import { addDays } from '../../src/engine/index.js';
import { median } from './timing.js';
import { dropTestDatabase, freshTestDatabaseUrl, postgresReachable } from '../support/database.js';
import { REPO_ROOT, RESULTS_DIR, RUNTIME } from './paths.js';
import { startBenchService } from './service-process.js';
import { benchBootstrapKey } from './bench-key.js';

const WORK = join(REPO_ROOT, 'var', 'bench-weather');
const KEY = benchBootstrapKey('weathrbn');
const RUNS = Number(process.env.WEATHER_BENCH_RUNS ?? 7);
const FIRST_YEAR = 1991;
const YEARS = 30;
const TARGET_MS = 1000;
/** Invented: no real station has this id (country code ZZ is not assigned). */
const ARCHIVE_ID = 'ZZW00098765';

interface Day {
  date: string;
  tmax: number;
  tmin: number;
}

/** Invented temperatures in tenths of °C: a seasonal wave and a day-to-day wobble, every 211th day missing. */
function inventedDays(): (Day | null)[] {
  const days: (Day | null)[] = [];
  let date = `${FIRST_YEAR}-01-01`;
  for (let i = 0; date < `${FIRST_YEAR + YEARS}-01-01`; i++, date = addDays(date, 1)) {
    if (i % 211 === 100) {
      days.push(null);
      continue;
    }
    const season = Math.cos((2 * Math.PI * (i - 200)) / 365.25);
    const mean = 110 + 120 * season + ((i * 37) % 41) - 20;
    days.push({ date, tmax: Math.round(mean + 55), tmin: Math.round(mean - 55) });
  }
  return days;
}

/** The .dly text: two lines (TMAX, TMIN) per month, 31 slots each, −9999 beyond the month's end and for missing days. */
function dlyFile(days: readonly (Day | null)[]): string {
  const byMonth = new Map<string, Map<number, Day>>();
  let date = `${FIRST_YEAR}-01-01`;
  for (const day of days) {
    const month = date.slice(0, 7);
    if (!byMonth.has(month)) byMonth.set(month, new Map());
    if (day) byMonth.get(month)!.set(Number(date.slice(8, 10)), day);
    date = addDays(date, 1);
  }
  const lines: string[] = [];
  for (const [month, values] of byMonth) {
    for (const element of ['TMAX', 'TMIN'] as const) {
      let line = `${ARCHIVE_ID}${month.slice(0, 4)}${month.slice(5, 7)}${element}`;
      for (let d = 1; d <= 31; d++) {
        const day = values.get(d);
        const value = day ? (element === 'TMAX' ? day.tmax : day.tmin) : -9999;
        line += `${String(value).padStart(5, ' ')} ${' '}${day ? 'S' : ' '}`;
      }
      lines.push(line);
    }
  }
  return `${lines.join('\n')}\n`;
}

function startServer(databaseUrl: string): Promise<{ child: ChildProcess; base: string }> {
  return startBenchService({ databaseUrl, bootstrapKey: KEY, attempts: 300 });
}

async function send(base: string, method: string, path: string, body: string, contentType: string): Promise<any> {
  const response = await fetch(`${base}${path}`, {
    method,
    headers: { authorization: `Bearer ${KEY}`, 'content-type': contentType },
    body,
  });
  const text = await response.text();
  if (!response.ok) throw new Error(`${method} ${path} → ${response.status}: ${text.slice(0, 300)}`);
  return JSON.parse(text);
}

const newStation = async (base: string, name: string): Promise<string> =>
  (await send(base, 'POST', '/v1/weather-stations', JSON.stringify({ name, temperatureUnit: 'C' }), 'application/json'))
    .id;

interface ScenarioResult {
  database: string;
  days: number;
  fileBytes: number;
  runs: number;
  importMs: number[];
  referenceMs: number[];
  medianImportMs: number;
  medianReferenceMs: number;
  ratioToReference: number;
  target: string;
  pass: boolean;
}

async function scenario(
  database: string,
  databaseUrl: string,
  file: string,
  days: readonly Day[],
): Promise<ScenarioResult> {
  const { child, base } = await startServer(databaseUrl);
  try {
    const observations = JSON.stringify({
      observations: days.map((d) => ({ date: d.date, tmin: d.tmin / 10, tmax: d.tmax / 10 })),
    });
    const importMs: number[] = [];
    const referenceMs: number[] = [];
    // One untimed round first (JIT, prepared statements), then the timed ones; each into new stations.
    for (let run = 0; run <= RUNS; run++) {
      const importStation = await newStation(base, `Bench import station ${run} (invented)`);
      let started = performance.now();
      const imported = await send(
        base,
        'POST',
        `/v1/weather-stations/${importStation}/imports?format=ghcn-dly`,
        file,
        'text/plain',
      );
      const ms = performance.now() - started;
      if (imported.created !== days.length)
        throw new Error(`import created ${imported.created} of ${days.length} days`);
      const referenceStation = await newStation(base, `Bench reference station ${run} (invented)`);
      started = performance.now();
      const posted = await send(
        base,
        'PUT',
        `/v1/weather-stations/${referenceStation}/observations`,
        observations,
        'application/json',
      );
      const refMs = performance.now() - started;
      if (posted.created !== days.length) throw new Error(`reference created ${posted.created} of ${days.length} days`);
      if (run > 0) {
        importMs.push(ms);
        referenceMs.push(refMs);
      }
    }
    const medianImportMs = median(importMs);
    const medianReferenceMs = median(referenceMs);
    return {
      database,
      days: days.length,
      fileBytes: Buffer.byteLength(file),
      runs: RUNS,
      importMs,
      referenceMs,
      medianImportMs,
      medianReferenceMs,
      ratioToReference: medianImportMs / medianReferenceMs,
      target: `≤ ${TARGET_MS} ms per import (median)`,
      pass: medianImportMs <= TARGET_MS,
    };
  } finally {
    child.kill('SIGTERM');
  }
}

async function main(): Promise<void> {
  rmSync(WORK, { recursive: true, force: true });
  mkdirSync(WORK, { recursive: true });
  const all = inventedDays();
  const days = all.filter((d): d is Day => d !== null);
  const file = dlyFile(all);
  // WEATHER_BENCH_ONLY=sqlite|postgres runs one database alone.
  const only = process.env.WEATHER_BENCH_ONLY;
  const runs: ScenarioResult[] = [];
  if (only !== 'postgres') runs.push(await scenario('SQLite', `sqlite:${join(WORK, 'weather.sqlite')}`, file, days));
  if (only !== 'sqlite' && (await postgresReachable())) {
    process.env.MVLEDGER_TEST_DIALECT = 'postgres';
    const url = freshTestDatabaseUrl();
    try {
      runs.push(await scenario('PostgreSQL', url, file, days));
    } finally {
      await dropTestDatabase(url);
    }
  }
  const lines = [
    `Weather import benchmark (${RUNTIME}; loopback, the service in its own process; a constructed .dly file, invented values)`,
  ];
  for (const r of runs) {
    lines.push(
      `  ${r.database}: ${r.days.toLocaleString('en-US')} days (${YEARS} years, ${Math.round(r.fileBytes / 1024)} KiB of .dly), median of ${r.runs} runs`,
    );
    lines.push(`    import through the API (read, check, store, audit): ${r.medianImportMs.toFixed(0)} ms`);
    lines.push(
      `    reference (the same days as JSON observations, PUT …/observations): ${r.medianReferenceMs.toFixed(0)} ms; import/reference ${r.ratioToReference.toFixed(2)}`,
    );
    lines.push(`    target ${r.target}: ${r.pass ? 'PASS' : 'MISS'}`);
  }
  process.stdout.write(`${lines.join('\n')}\n`);
  mkdirSync(RESULTS_DIR, { recursive: true });
  writeFileSync(
    join(RESULTS_DIR, 'weather-import-latest.json'),
    `${JSON.stringify({ node: process.version, runtime: RUNTIME, ranAt: new Date().toISOString(), runs }, null, 2)}\n`,
  );
}

await main();
