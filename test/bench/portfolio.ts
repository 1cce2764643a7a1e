/**
 * The streamed report of a large invented portfolio (src/demo/portfolio.ts:
 * by default 2,000 facilities, 10,000 meters, 36 monthly bills each),
 * generated through the store into a SQLite file and a PostgreSQL schema,
 * then for each database, each measurement in a fresh node process (so its
 * peak resident memory is its own, and the frozen-model cache starts cold):
 *   - the quarterly report (2025-Q3) streamed as JSON and as CSV to a sink
 *     that counts the bytes: time, peak RSS, and the same report again in
 *     the same process (the model cache warm, as in a running service);
 *   - reference: the whole-document report (savingsReport, then
 *     JSON.stringify), as GET /v1/reports/savings builds it.
 * Environment: PORTFOLIO_FACILITIES (default 2000), PORTFOLIO_DATABASES
 * (sqlite,postgres), PORTFOLIO_REFERENCE=off to skip the reference.
 * Target (issue): the streamed report ≤ 5 s on each database, memory bounded.
 */
import { execFileSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import pg from 'pg';
import { FULL_PORTFOLIO, generatePortfolio } from '../../src/demo/portfolio.js';
import { streamSavingsReport, type StreamFormat } from '../../src/services/report-stream.js';
import { savingsReport } from '../../src/services/reports.js';
import { openStore } from '../../src/store/connect.js';
import { migrateToLatest } from '../../src/store/migrate.js';
import { RESULTS_DIR, RUNTIME } from './paths.js';

const QUERY = { quarter: '2025-Q3' };
const POSTGRES_URL = process.env.MVLEDGER_BENCH_POSTGRES_URL ?? 'postgres://postgres@127.0.0.1:5432/test';

interface Measurement {
  mode: string;
  ms: number;
  warmMs: number | null;
  bytes: number;
  peakRssMb: number;
  heapUsedAfterMb: number;
}

/** One measurement, run in this process (started by the parent with --measure). */
async function measure(url: string, organisationId: string, mode: string): Promise<Measurement> {
  const store = openStore(url);
  try {
    const run = async (): Promise<{ ms: number; bytes: number }> => {
      const start = performance.now();
      let bytes = 0;
      if (mode === 'whole-json') {
        const report = await savingsReport(store.db, organisationId, QUERY);
        bytes = Buffer.byteLength(`${JSON.stringify(report, null, 2)}\n`);
      } else {
        const format = mode.replace('stream-', '') as StreamFormat;
        await streamSavingsReport(store.db, organisationId, QUERY, format, (text) => {
          bytes += Buffer.byteLength(text);
        });
      }
      return { ms: performance.now() - start, bytes };
    };
    const cold = await run();
    const warm = mode === 'whole-json' ? null : await run();
    return {
      mode,
      ms: cold.ms,
      warmMs: warm?.ms ?? null,
      bytes: cold.bytes,
      peakRssMb: process.resourceUsage().maxRSS / 1024,
      heapUsedAfterMb: process.memoryUsage().heapUsed / 2 ** 20,
    };
  } finally {
    await store.close();
  }
}

function measureInChild(url: string, organisationId: string, mode: string): Measurement {
  const out = execFileSync(process.execPath, [fileURLToPath(import.meta.url), '--measure', url, organisationId, mode], {
    encoding: 'utf8',
    maxBuffer: 1 << 20,
  });
  return JSON.parse(out.trim().split('\n').pop()!) as Measurement;
}

async function prepare(
  database: string,
  facilities: number,
): Promise<{ url: string; organisationId: string; generateMs: number; cleanup: () => Promise<void> }> {
  let url: string;
  let cleanup: () => Promise<void>;
  if (database === 'sqlite') {
    const folder = mkdtempSync(join(tmpdir(), 'mvledger-bench-portfolio-'));
    url = `sqlite:${join(folder, 'portfolio.sqlite')}`;
    cleanup = async () => rmSync(folder, { recursive: true, force: true });
  } else {
    const schema = `mvl_bench_portfolio_${process.pid}`;
    const u = new URL(POSTGRES_URL);
    u.searchParams.set('schema', schema);
    url = u.toString();
    cleanup = async () => {
      const client = new pg.Client({ connectionString: POSTGRES_URL });
      await client.connect();
      await client.query(`drop schema if exists ${schema} cascade`);
      await client.end();
    };
  }
  const store = openStore(url);
  try {
    await migrateToLatest(store.db);
    const start = performance.now();
    const generated = await generatePortfolio(store.db, { ...FULL_PORTFOLIO, facilities });
    return { url, organisationId: generated.organisationId, generateMs: performance.now() - start, cleanup };
  } finally {
    await store.close();
  }
}

async function main(): Promise<void> {
  const facilities = Number(process.env.PORTFOLIO_FACILITIES ?? FULL_PORTFOLIO.facilities);
  const databases = (process.env.PORTFOLIO_DATABASES ?? 'sqlite,postgres').split(',');
  const reference = process.env.PORTFOLIO_REFERENCE !== 'off';
  const meters = facilities * FULL_PORTFOLIO.metersPerFacility;
  console.log(
    `streamed report, invented portfolio of ${facilities} facilities and ${meters} meters, quarter 2025-Q3 (${RUNTIME}):`,
  );
  const results: Record<string, unknown> = {
    measuredAt: new Date().toISOString(),
    node: process.version,
    facilities,
    meters,
  };
  for (const database of databases) {
    const prepared = await prepare(database, facilities);
    try {
      console.log(`  ${database}: generated in ${(prepared.generateMs / 1000).toFixed(1)} s`);
      const rows: Measurement[] = [];
      for (const mode of ['stream-json', 'stream-csv', ...(reference ? ['whole-json'] : [])]) {
        const m = measureInChild(prepared.url, prepared.organisationId, mode);
        rows.push(m);
        console.log(
          `    ${mode.padEnd(11)} ${(m.ms / 1000).toFixed(2)} s${m.warmMs === null ? '' : ` (again in the same process: ${(m.warmMs / 1000).toFixed(2)} s)`}, ${(m.bytes / 2 ** 20).toFixed(1)} MiB written, peak RSS ${m.peakRssMb.toFixed(0)} MiB`,
        );
      }
      const whole = rows.find((r) => r.mode === 'whole-json');
      const json = rows.find((r) => r.mode === 'stream-json')!;
      if (whole) {
        console.log(
          `    reference/streamed: time ${(whole.ms / json.ms).toFixed(2)}x, peak RSS ${(whole.peakRssMb / json.peakRssMb).toFixed(2)}x`,
        );
      }
      results[database] = { generateMs: prepared.generateMs, measurements: rows };
    } finally {
      await prepared.cleanup();
    }
  }
  mkdirSync(RESULTS_DIR, { recursive: true });
  writeFileSync(join(RESULTS_DIR, 'portfolio-latest.json'), `${JSON.stringify(results, null, 2)}\n`);
}

if (process.argv[2] === '--measure') {
  const [url, organisationId, mode] = process.argv.slice(3) as [string, string, string];
  console.log(JSON.stringify(await measure(url, organisationId, mode)));
} else {
  await main();
}
