/**
 * Soak (npm run soak): the service in its own process on a fresh SQLite file
 * (or PostgreSQL with SOAK_DATABASE=postgres), loaded for SOAK_SECONDS
 * (default 60) on loopback by two clients at once: a billing system posting
 * batches of daily readings back to back, and autocannon reading savings.
 * Every SOAK_SAMPLE_SECONDS the service's resident memory is read from
 * /proc. Afterwards every acknowledged batch must be stored whole and the
 * audit chain must verify: nothing lost. Invented data only. Prints a summary
 * and writes results/soak-latest.json.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { mkdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { performance } from 'node:perf_hooks';
import autocannon from 'autocannon';
import { addDays } from '../../src/engine/index.js';
import {
  BASELINE_END,
  BASELINE_START,
  DEMO_FACILITIES,
  REPORTING_END,
  demoBills,
  demoWeather,
} from '../../src/demo/scenario.js';
import { openStore } from '../../src/store/connect.js';
import { verifyAllAuditChains } from '../../src/store/audit.js';
import { median, quantile } from './timing.js';
import { dropTestDatabase, freshTestDatabaseUrl, postgresReachable } from '../support/database.js';
import { freePort } from '../support/ports.js';
import { REPO_ROOT, RESULTS_DIR, serverArguments } from './paths.js';
import { benchBootstrapKey } from './bench-key.js';

const ROOT = REPO_ROOT;
const WORK = join(ROOT, 'var', 'soak');
const KEY = benchBootstrapKey('soakkey1');
const SECONDS = Number(process.env.SOAK_SECONDS ?? 60);
const SAMPLE_SECONDS = Number(process.env.SOAK_SAMPLE_SECONDS ?? 5);
const BATCH_DAYS = 500;
/** A billing system posts, waits for the answer, then pauses this long: steady load, not a flood. */
const PAUSE_MS = Number(process.env.SOAK_PAUSE_MS ?? 50);
/** Days per ingestion meter before the next one starts (keeps dates in range and checks cheap). */
const DAYS_PER_METER = 20_000;

function residentMb(pid: number): number {
  const status = readFileSync(`/proc/${pid}/status`, 'utf8');
  const kb = Number(/VmRSS:\s+(\d+)/.exec(status)?.[1] ?? Number.NaN);
  return kb / 1024;
}

async function main(): Promise<void> {
  rmSync(WORK, { recursive: true, force: true });
  mkdirSync(WORK, { recursive: true });
  const usePostgres = process.env.SOAK_DATABASE === 'postgres';
  if (usePostgres && !(await postgresReachable()))
    throw new Error('SOAK_DATABASE=postgres but PostgreSQL does not answer');
  if (usePostgres) process.env.MVLEDGER_TEST_DIALECT = 'postgres';
  const databaseUrl = usePostgres ? freshTestDatabaseUrl() : `sqlite:${join(WORK, 'soak.sqlite')}`;
  const port = await freePort();
  const child: ChildProcess = spawn(process.execPath, serverArguments(), {
    env: {
      ...process.env,
      PORT: String(port),
      HOST: '127.0.0.1',
      DATABASE_URL: databaseUrl,
      LOG_LEVEL: 'warn',
      MVLEDGER_BOOTSTRAP_KEY: KEY,
      RATE_LIMIT_PER_MINUTE: '0',
    },
    stdio: ['ignore', 'inherit', 'inherit'],
  });
  const base = `http://127.0.0.1:${port}`;
  try {
    for (let attempt = 0; ; attempt++) {
      try {
        if ((await fetch(`${base}/readyz`)).ok) break;
      } catch {
        // not up yet
      }
      if (attempt > 300) throw new Error('the service did not become ready');
      await new Promise((r) => setTimeout(r, 100));
    }
    const call = async (method: string, path: string, body?: unknown): Promise<{ status: number; json: any }> => {
      const response = await fetch(`${base}${path}`, {
        method,
        headers: {
          authorization: `Bearer ${KEY}`,
          ...(body === undefined ? {} : { 'content-type': 'application/json' }),
        },
        ...(body === undefined ? {} : { body: JSON.stringify(body) }),
      });
      const text = await response.text();
      return { status: response.status, json: text ? JSON.parse(text) : undefined };
    };
    const must = async (method: string, path: string, body?: unknown) => {
      const answer = await call(method, path, body);
      if (answer.status >= 300)
        throw new Error(`${method} ${path} → ${answer.status} ${JSON.stringify(answer.json).slice(0, 200)}`);
      return answer.json;
    };

    // A savings meter (36 months) and an ingestion meter.
    const weather = demoWeather();
    const byDate = new Map(weather.map((d) => [d.date, d.temp]));
    const station = await must('POST', '/v1/weather-stations', {
      name: 'Soak station (invented)',
      temperatureUnit: 'F',
    });
    await must('PUT', `/v1/weather-stations/${station.id}/observations`, { observations: weather });
    const facility = await must('POST', '/v1/facilities', { name: 'Soak facility (invented)' });
    const plan = DEMO_FACILITIES[0]!.meters[0]!;
    const savingsMeter = await must('POST', `/v1/facilities/${facility.id}/meters`, {
      name: 'Savings meter',
      fuel: 'electricity',
      unit: 'kWh',
      weatherStationId: station.id,
    });
    await must('POST', `/v1/meters/${savingsMeter.id}/readings`, {
      readings: demoBills(plan, byDate, BASELINE_START, BASELINE_END, 0, 1),
    });
    const baseline = await must('POST', `/v1/meters/${savingsMeter.id}/baselines`, {
      start: BASELINE_START,
      end: BASELINE_END,
    });
    await must('POST', `/v1/baselines/${baseline.id}/freeze`, { note: 'soak' });
    await must('POST', `/v1/meters/${savingsMeter.id}/readings`, {
      readings: demoBills(plan, byDate, BASELINE_END, REPORTING_END, 0.1, 2),
    });
    const ingestMeters: string[] = [];
    const ingestMeter = async (index: number): Promise<string> => {
      while (ingestMeters.length <= index) {
        const meter = await must('POST', `/v1/facilities/${facility.id}/meters`, {
          name: `Ingestion meter ${ingestMeters.length + 1}`,
          fuel: 'electricity',
          unit: 'kWh',
          weatherStationId: station.id,
        });
        ingestMeters.push(meter.id);
      }
      return ingestMeters[index]!;
    };

    const memory: { second: number; residentMb: number }[] = [{ second: 0, residentMb: residentMb(child.pid!) }];
    const started = performance.now();
    const sampler = setInterval(
      () =>
        memory.push({ second: Math.round((performance.now() - started) / 1000), residentMb: residentMb(child.pid!) }),
      SAMPLE_SECONDS * 1000,
    );

    // Billing system: back-to-back batches until time is up.
    const acknowledged: { meter: number; first: string; days: number }[] = [];
    const batchMs: number[] = [];
    const failures: string[] = [];
    const ingestion = (async () => {
      let day = 0;
      while (performance.now() - started < SECONDS * 1000) {
        const meter = Math.floor(day / DAYS_PER_METER);
        const first = addDays('1950-01-01', day % DAYS_PER_METER);
        const readings = Array.from({ length: BATCH_DAYS }, (_, k) => ({
          start: addDays(first, k),
          end: addDays(first, k + 1),
          quantity: 500 + ((day + k) % 97),
        }));
        const meterId = await ingestMeter(meter);
        const t0 = performance.now();
        const answer = await call('POST', `/v1/meters/${meterId}/readings`, { readings });
        batchMs.push(performance.now() - t0);
        if (answer.status === 201) acknowledged.push({ meter, first, days: BATCH_DAYS });
        else failures.push(`batch at ${first}: ${answer.status}`);
        day += BATCH_DAYS;
        await new Promise((r) => setTimeout(r, PAUSE_MS));
      }
    })();
    const reads = autocannon({
      url: `${base}/v1/meters/${savingsMeter.id}/savings?confidence=0.9`,
      connections: 8,
      duration: SECONDS,
      headers: { authorization: `Bearer ${KEY}` },
    });
    const [load] = await Promise.all([reads, ingestion]);
    clearInterval(sampler);
    memory.push({ second: Math.round((performance.now() - started) / 1000), residentMb: residentMb(child.pid!) });

    // Nothing lost: every acknowledged batch is stored whole, the chain verifies.
    let missing = 0;
    let storedCount = 0;
    for (let meter = 0; meter < ingestMeters.length; meter++) {
      const stored = await must('GET', `/v1/meters/${ingestMeters[meter]}/readings`);
      storedCount += stored.readings.length;
      const storedStarts = new Set<string>(stored.readings.map((r: { start: string }) => r.start));
      for (const batch of acknowledged.filter((b) => b.meter === meter))
        for (let k = 0; k < batch.days; k++) if (!storedStarts.has(addDays(batch.first, k))) missing++;
    }
    const store = openStore(databaseUrl);
    const chain = await verifyAllAuditChains(store.db);
    await store.close();

    const firstHalf = memory.filter((m) => m.second <= SECONDS / 2).map((m) => m.residentMb);
    const results = {
      ranAt: new Date().toISOString(),
      node: process.version,
      database: usePostgres ? 'PostgreSQL' : 'SQLite',
      seconds: SECONDS,
      ingestion: {
        batches: acknowledged.length,
        readings: acknowledged.length * BATCH_DAYS,
        readingsPerSecond: (acknowledged.length * BATCH_DAYS) / SECONDS,
        batchP50Ms: median(batchMs),
        batchP99Ms: quantile(batchMs, 0.99),
        failures: failures.length,
      },
      savings: {
        requests: load.requests.total,
        requestsPerSecond: load.requests.average,
        p50Ms: load.latency.p50,
        p99Ms: load.latency.p99,
        non2xx: load.non2xx,
        errors: load.errors,
      },
      memory: {
        startMb: memory[0]!.residentMb,
        peakMb: Math.max(...memory.map((m) => m.residentMb)),
        endMb: memory[memory.length - 1]!.residentMb,
        growthSecondHalfMb: memory[memory.length - 1]!.residentMb - Math.max(...firstHalf),
        samples: memory,
      },
      lost: {
        readingsMissing: missing,
        storedReadings: storedCount,
        auditChainOk: chain.ok,
        auditRowsChecked: chain.checked,
      },
    };
    const r = results;
    process.stdout.write(
      [
        `Soak, ${r.database}, ${r.seconds} s on loopback (service in its own process; invented data)`,
        `  ingestion: ${r.ingestion.batches} batches of ${BATCH_DAYS} readings acknowledged (${Math.round(r.ingestion.readingsPerSecond).toLocaleString('en-US')} readings/s), batch p50 ${r.ingestion.batchP50Ms.toFixed(1)} ms, p99 ${r.ingestion.batchP99Ms.toFixed(1)} ms, refused ${r.ingestion.failures}`,
        `  savings at the same time: ${r.savings.requests.toLocaleString('en-US')} requests (${Math.round(r.savings.requestsPerSecond)}/s), p50 ${r.savings.p50Ms} ms, p99 ${r.savings.p99Ms} ms, non-2xx ${r.savings.non2xx}, errors ${r.savings.errors}`,
        `  service memory (RSS): ${r.memory.startMb.toFixed(0)} MB at start, peak ${r.memory.peakMb.toFixed(0)} MB, ${r.memory.endMb.toFixed(0)} MB at the end; growth over the second half ${r.memory.growthSecondHalfMb.toFixed(1)} MB`,
        `  lost: ${r.lost.readingsMissing} acknowledged readings missing of ${r.ingestion.readings.toLocaleString('en-US')}; audit chain ${r.lost.auditChainOk ? 'verifies' : 'BROKEN'} (${r.lost.auditRowsChecked} rows)`,
        '',
      ].join('\n'),
    );
    mkdirSync(RESULTS_DIR, { recursive: true });
    writeFileSync(
      join(RESULTS_DIR, `soak-${usePostgres ? 'postgres' : 'sqlite'}-latest.json`),
      `${JSON.stringify(results, null, 2)}\n`,
    );
    if (missing > 0 || !chain.ok || load.non2xx > 0 || failures.length > 0) process.exitCode = 1;
  } finally {
    child.kill('SIGTERM');
    if (usePostgres) await dropTestDatabase(databaseUrl);
  }
}

await main();
