/**
 * Service benchmark (npm run bench): the HTTP service in its own process on
 * loopback, on a fresh SQLite file and, when a server answers, on a fresh
 * PostgreSQL schema: the same load on both, reported side by side.
 *
 * 1. Ingest 100,000 daily readings (10 meters × 10,000 days) in batches
 *    through POST /v1/meters/{id}/readings; beside it, the plain reference:
 *    the same rows written straight into the same database with no HTTP and
 *    no checks (one prepared statement for SQLite, multi-row INSERTs for
 *    PostgreSQL), one transaction per meter; on PostgreSQL also the bulk
 *    path alone (INSERT … SELECT FROM unnest of column arrays, no checks).
 * 2. Serve GET /v1/meters/{id}/savings for a 36-month meter (24 baseline and
 *    12 reporting bills) under concurrent load with autocannon: warm (the
 *    document kept for the meter's data version), warm revalidation
 *    (If-None-Match → 304), and cold (a second instance on the same database
 *    with SAVINGS_CACHE_MB=0, computing every request); beside them, the
 *    same savings computed in-process by the engine alone.
 * Invented data only. Prints a table and writes results/service-latest.json.
 */
import type { ChildProcess } from 'node:child_process';
import { mkdirSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { performance } from 'node:perf_hooks';
import autocannon from 'autocannon';
import SQLite from 'better-sqlite3';
import pg from 'pg';
import { addDays, analyseBaseline, savingsFromFit } from '../../src/engine/index.js';
import {
  BASELINE_END,
  BASELINE_START,
  DEMO_FACILITIES,
  REPORTING_END,
  demoBills,
  demoWeather,
} from '../../src/demo/scenario.js';
import { median, quantile } from './timing.js';
import { postgresReachable, testPostgresUrl } from '../support/database.js';
import { REPO_ROOT, RESULTS_DIR } from './paths.js';
import { startBenchService } from './service-process.js';
import { benchBootstrapKey } from './bench-key.js';

const ROOT = REPO_ROOT;
const WORK = join(ROOT, 'var', 'bench');
const BOOTSTRAP_KEY = benchBootstrapKey('benchkey');
const METERS = 10;
const DAYS_PER_METER = 10_000;
const BATCH = 2_500;
const LOAD_SECONDS = 10;
const CONNECTIONS = 10;

function startServer(
  databaseUrl: string,
  extraEnv: Record<string, string> = {},
): Promise<{ child: ChildProcess; base: string }> {
  return startBenchService({ databaseUrl, bootstrapKey: BOOTSTRAP_KEY, extraEnv });
}

async function api(base: string, method: string, path: string, body?: unknown): Promise<any> {
  const response = await fetch(`${base}${path}`, {
    method,
    headers: {
      authorization: `Bearer ${BOOTSTRAP_KEY}`,
      ...(body === undefined ? {} : { 'content-type': 'application/json' }),
    },
    ...(body === undefined ? {} : { body: JSON.stringify(body) }),
  });
  const text = await response.text();
  if (!response.ok) throw new Error(`${method} ${path} → ${response.status}: ${text.slice(0, 300)}`);
  return text ? JSON.parse(text) : undefined;
}

function dailyReadings(meterIndex: number): { start: string; end: string; quantity: number }[] {
  const out = [];
  for (let d = 0; d < DAYS_PER_METER; d++) {
    const start = addDays('1990-01-01', d);
    out.push({ start, end: addDays(start, 1), quantity: 1000 + ((d * 37 + meterIndex * 11) % 400) });
  }
  return out;
}

function referenceInsertSqlite(file: string): number {
  const db = new SQLite(file);
  db.pragma('journal_mode = WAL');
  db.exec(
    'create table readings (meter_id text, period_start text, period_end text, quantity real, estimated integer, cost real, created_at text, updated_at text, primary key (meter_id, period_start, period_end))',
  );
  const insert = db.prepare('insert into readings values (?, ?, ?, ?, 0, null, ?, ?)');
  const started = performance.now();
  const now = new Date().toISOString();
  for (let m = 0; m < METERS; m++) {
    const rows = dailyReadings(m);
    db.transaction(() => {
      for (const r of rows) insert.run(`m${m}`, r.start, r.end, r.quantity, now, now);
    })();
  }
  const ms = performance.now() - started;
  db.close();
  return ms;
}

async function referenceInsertPostgres(url: string, schema: string): Promise<number> {
  const client = new pg.Client({ connectionString: url });
  await client.connect();
  try {
    await client.query(`create schema ${schema}`);
    await client.query(
      `create table ${schema}.readings (meter_id text, period_start text, period_end text, quantity double precision, estimated integer, cost double precision, created_at text, updated_at text, primary key (meter_id, period_start, period_end))`,
    );
    const now = new Date().toISOString();
    const started = performance.now();
    for (let m = 0; m < METERS; m++) {
      const rows = dailyReadings(m);
      await client.query('begin');
      for (let i = 0; i < rows.length; i += 1000) {
        const chunk = rows.slice(i, i + 1000);
        const values: unknown[] = [];
        const tuples = chunk.map((r, k) => {
          values.push(`m${m}`, r.start, r.end, r.quantity, now, now);
          const b = k * 6;
          return `($${b + 1}, $${b + 2}, $${b + 3}, $${b + 4}, 0, null, $${b + 5}, $${b + 6})`;
        });
        await client.query(`insert into ${schema}.readings values ${tuples.join(', ')}`, values);
      }
      await client.query('commit');
    }
    return performance.now() - started;
  } finally {
    await client.query(`drop schema if exists ${schema} cascade`).catch(() => {});
    await client.end();
  }
}

/** The bulk path alone on PostgreSQL: column arrays unnested into one INSERT per batch, no HTTP, no checks. */
async function referenceUnnestPostgres(url: string, schema: string): Promise<number> {
  const client = new pg.Client({ connectionString: url });
  await client.connect();
  try {
    await client.query(`create schema ${schema}`);
    await client.query(
      `create table ${schema}.readings (meter_id text, period_start text, period_end text, quantity double precision, estimated integer, cost double precision, created_at text, updated_at text, primary key (meter_id, period_start, period_end))`,
    );
    const now = new Date().toISOString();
    const started = performance.now();
    for (let m = 0; m < METERS; m++) {
      const rows = dailyReadings(m);
      await client.query('begin');
      for (let i = 0; i < rows.length; i += BATCH) {
        const chunk = rows.slice(i, i + BATCH);
        await client.query(
          `insert into ${schema}.readings select $1, s, e, q, 0, null, $2, $2 from unnest($3::text[], $4::text[], $5::float8[]) as t(s, e, q)`,
          [`m${m}`, now, chunk.map((r) => r.start), chunk.map((r) => r.end), chunk.map((r) => r.quantity)],
        );
      }
      await client.query('commit');
    }
    return performance.now() - started;
  } finally {
    await client.query(`drop schema if exists ${schema} cascade`).catch(() => {});
    await client.end();
  }
}

interface LoadFigures {
  requests: number;
  requestsPerSecond: number;
  p50Ms: number;
  p99Ms: number;
  non2xx: number;
  errors: number;
  pass: boolean;
}

async function load(url: string, headers: Record<string, string> = {}, expectStatus = 200): Promise<LoadFigures> {
  let unexpected = 0;
  const result = await autocannon({
    url,
    connections: CONNECTIONS,
    duration: LOAD_SECONDS,
    headers: { authorization: `Bearer ${BOOTSTRAP_KEY}`, ...headers },
    setupClient: (client) => {
      client.on('response', (status: number) => {
        if (status !== expectStatus) unexpected++;
      });
    },
  });
  return {
    requests: result.requests.total,
    requestsPerSecond: result.requests.average,
    p50Ms: result.latency.p50,
    p99Ms: result.latency.p99,
    non2xx: unexpected,
    errors: result.errors,
    pass: result.requests.average >= 1000 && result.latency.p99 < 25 && unexpected === 0 && result.errors === 0,
  };
}

interface ScenarioResult {
  database: string;
  ingestion: Record<string, unknown> & {
    readingsPerSecond: number;
    referenceReadingsPerSecond: number;
    ratioToReference: number;
    medianBatchMs: number;
    seconds: number;
    pass: boolean;
    referenceBulkReadingsPerSecond?: number;
  };
  savings: Record<string, unknown> &
    LoadFigures & {
      revalidation: LoadFigures;
      cold: LoadFigures;
    };
}

async function main(): Promise<void> {
  rmSync(WORK, { recursive: true, force: true });
  mkdirSync(WORK, { recursive: true });
  const runs: ScenarioResult[] = [];
  runs.push(
    await scenario('SQLite', `sqlite:${join(WORK, 'service.sqlite')}`, () =>
      Promise.resolve(referenceInsertSqlite(join(WORK, 'reference.sqlite'))),
    ),
  );
  if (await postgresReachable()) {
    const suffix = `${process.pid}_${Date.now().toString(36)}`;
    const url = new URL(testPostgresUrl());
    url.searchParams.set('schema', `mvl_bench_${suffix}`);
    try {
      runs.push(
        await scenario(
          'PostgreSQL',
          url.toString(),
          () => referenceInsertPostgres(testPostgresUrl(), `mvl_benchref_${suffix}`),
          () => referenceUnnestPostgres(testPostgresUrl(), `mvl_benchbulk_${suffix}`),
        ),
      );
    } finally {
      const client = new pg.Client({ connectionString: testPostgresUrl() });
      await client.connect();
      await client.query(`drop schema if exists mvl_bench_${suffix} cascade`);
      await client.end();
    }
  } else {
    process.stdout.write(
      `PostgreSQL does not answer at ${testPostgresUrl()}: the service benchmark ran on SQLite only\n`,
    );
  }
  report(runs);
}

async function scenario(
  database: string,
  databaseUrl: string,
  reference: () => Promise<number>,
  bulkReference?: () => Promise<number>,
): Promise<ScenarioResult> {
  const { child, base } = await startServer(databaseUrl);
  let coldChild: ChildProcess | null = null;
  try {
    const station = await api(base, 'POST', '/v1/weather-stations', {
      name: 'Bench station (invented)',
      temperatureUnit: 'F',
    });
    const facility = await api(base, 'POST', '/v1/facilities', { name: 'Bench facility (invented)' });

    // 1. Ingestion.
    const meters: string[] = [];
    for (let m = 0; m < METERS; m++) {
      const meter = await api(base, 'POST', `/v1/facilities/${facility.id}/meters`, {
        name: `Bench meter ${m}`,
        fuel: 'electricity',
        unit: 'kWh',
        weatherStationId: station.id,
      });
      meters.push(meter.id);
    }
    const batchMs: number[] = [];
    const ingestStart = performance.now();
    for (let m = 0; m < METERS; m++) {
      const rows = dailyReadings(m);
      for (let i = 0; i < rows.length; i += BATCH) {
        const started = performance.now();
        await api(base, 'POST', `/v1/meters/${meters[m]}/readings`, { readings: rows.slice(i, i + BATCH) });
        batchMs.push(performance.now() - started);
      }
    }
    const ingestMs = performance.now() - ingestStart;
    const total = METERS * DAYS_PER_METER;
    const referenceMs = await reference();
    const bulkReferenceMs = bulkReference ? await bulkReference() : null;

    // 2. Savings under load: one demo meter, 24 baseline + 12 reporting bills.
    const weather = demoWeather();
    const weatherByDate = new Map(weather.map((w) => [w.date, w.temp]));
    await api(base, 'PUT', `/v1/weather-stations/${station.id}/observations`, { observations: weather });
    const demoMeter = DEMO_FACILITIES[1]!.meters[0]!;
    const savingsMeter = await api(base, 'POST', `/v1/facilities/${facility.id}/meters`, {
      name: 'Bench 36-month meter',
      fuel: 'electricity',
      unit: 'kWh',
      weatherStationId: station.id,
    });
    const baselineBills = demoBills(demoMeter, weatherByDate, BASELINE_START, BASELINE_END, 0, 1);
    const reportingBills = demoBills(
      demoMeter,
      weatherByDate,
      BASELINE_END,
      REPORTING_END,
      demoMeter.reportingSaving,
      2,
    );
    await api(base, 'POST', `/v1/meters/${savingsMeter.id}/readings`, { readings: baselineBills });
    const baseline = await api(base, 'POST', `/v1/meters/${savingsMeter.id}/baselines`, {
      start: BASELINE_START,
      end: BASELINE_END,
    });
    await api(base, 'POST', `/v1/baselines/${baseline.id}/freeze`, { note: 'benchmark' });
    await api(base, 'POST', `/v1/meters/${savingsMeter.id}/readings`, { readings: reportingBills });
    const url = `${base}/v1/meters/${savingsMeter.id}/savings?confidence=0.9`;
    const first = await fetch(url, { headers: { authorization: `Bearer ${BOOTSTRAP_KEY}` } });
    const etag = first.headers.get('etag')!;
    await first.text();
    const warm = await load(url);
    const revalidation = await load(url, { 'if-none-match': etag }, 304);
    // Cold: a second instance on the same database that keeps nothing, so every request computes.
    const cold = await startServer(databaseUrl, { SAVINGS_CACHE_MB: '0' });
    coldChild = cold.child;
    const coldLoad = await load(`${cold.base}/v1/meters/${savingsMeter.id}/savings?confidence=0.9`);

    // Reference: the engine alone, in-process, on the same data.
    const analysis = analyseBaseline(baselineBills, weather);
    const fit = analysis.choice.candidates.find((c) => c.model === analysis.choice.selected)!.fit!;
    const engineMs: number[] = [];
    for (let i = 0; i < 2000; i++) {
      const started = performance.now();
      savingsFromFit(
        fit,
        { limits: analysis.choice.settings.guideline14, excluded: analysis.excluded },
        reportingBills,
        weatherByDate,
        {
          confidence: 0.9,
        },
      );
      engineMs.push(performance.now() - started);
    }

    const results: ScenarioResult = {
      database,
      ingestion: {
        readings: total,
        batchSize: BATCH,
        seconds: ingestMs / 1000,
        readingsPerSecond: total / (ingestMs / 1000),
        medianBatchMs: median(batchMs),
        referenceReadingsPerSecond: total / (referenceMs / 1000),
        ratioToReference: referenceMs / ingestMs,
        ...(bulkReferenceMs === null ? {} : { referenceBulkReadingsPerSecond: total / (bulkReferenceMs / 1000) }),
        target: '≥ 50,000 readings/s',
        pass: total / (ingestMs / 1000) >= 50_000,
      },
      savings: {
        connections: CONNECTIONS,
        seconds: LOAD_SECONDS,
        ...warm,
        engineAloneMedianMs: median(engineMs),
        engineAloneP99Ms: quantile(engineMs, 0.99),
        target: '≥ 1,000 requests/s with p99 < 25 ms',
        revalidation,
        cold: coldLoad,
      },
    };
    return results;
  } finally {
    child.kill('SIGTERM');
    coldChild?.kill('SIGTERM');
  }
}

function report(runs: ScenarioResult[]): void {
  const lines = ['Service benchmark (loopback; the service in its own process; invented data)'];
  for (const run of runs) {
    const i = run.ingestion;
    const v = run.savings;
    lines.push(`  ${run.database}`);
    lines.push(
      `    ingestion: ${(i.readings as number).toLocaleString('en-US')} daily readings in batches of ${i.batchSize}: ${i.seconds.toFixed(2)} s → ${Math.round(i.readingsPerSecond).toLocaleString('en-US')} readings/s (median batch ${i.medianBatchMs.toFixed(1)} ms)`,
    );
    lines.push(
      `      reference (the same rows written straight in, no HTTP, no checks): ${Math.round(i.referenceReadingsPerSecond).toLocaleString('en-US')} readings/s; the API reaches ${(i.ratioToReference * 100).toFixed(0)}% of it`,
    );
    if (i.referenceBulkReadingsPerSecond !== undefined) {
      lines.push(
        `      reference (the bulk path alone: unnest of column arrays, no HTTP, no checks): ${Math.round(i.referenceBulkReadingsPerSecond).toLocaleString('en-US')} readings/s`,
      );
    }
    lines.push(`      target ${i.target}: ${i.pass ? 'PASS' : 'MISS'}`);
    const figures = (f: LoadFigures) =>
      `${Math.round(f.requestsPerSecond).toLocaleString('en-US')} requests/s, p50 ${f.p50Ms} ms, p99 ${f.p99Ms} ms, unexpected status ${f.non2xx}, errors ${f.errors}: ${f.pass ? 'PASS' : 'MISS'}`;
    lines.push(`    savings, ${v.connections} connections for ${v.seconds} s each:`);
    lines.push(`      warm (kept for the data version): ${figures(v)}`);
    lines.push(`      warm revalidation (If-None-Match → 304): ${figures(v.revalidation)}`);
    lines.push(`      cold (an instance that keeps nothing): ${figures(v.cold)}`);
    lines.push(
      `      reference (the engine alone, in-process): median ${(v.engineAloneMedianMs as number).toFixed(3)} ms, p99 ${(v.engineAloneP99Ms as number).toFixed(3)} ms per savings computation`,
    );
    lines.push(`      target ${v.target}: ${v.pass ? 'PASS' : 'MISS'}`);
  }
  process.stdout.write(`${lines.join('\n')}\n`);
  mkdirSync(RESULTS_DIR, { recursive: true });
  writeFileSync(
    join(RESULTS_DIR, 'service-latest.json'),
    `${JSON.stringify({ node: process.version, ranAt: new Date().toISOString(), runs }, null, 2)}\n`,
  );
}

await main();
