/**
 * What the fault tests share: a database each test owns (a temporary SQLite
 * file, or a fresh PostgreSQL schema) that outlives the service processes
 * started on it; raw HTTP requests whose fate is recorded (answered, or cut
 * off because the process died) and whose moment of being fully sent is
 * known, so a signal can be aimed at a request in flight; and the invented
 * data the tests send. Service processes come from test/multi-instance/support.ts.
 */
import { request as httpRequest } from 'node:http';
import { randomBytes } from 'node:crypto';
import { rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { ChildProcess } from 'node:child_process';
import { addDays } from '../../src/engine/index.js';
import type { Store } from '../../src/store/connect.js';
import { dropTestDatabase, freshTestDatabaseUrl, testDialect } from '../support/database.js';
import { CLIMATES, SAMPLE_BUILDING, dailyWeather, monthlyReadings, seededRandom } from '../support/synthetic.js';
import { startInstance, type Instance } from '../multi-instance/support.js';

// synthetic: the test sets the truth (matches the bootstrap key pattern of src/config.ts).
export const BOOTSTRAP_KEY = 'mvl_faulttst_cq4ASK8U0HDJEEE3YS1TDF8e2dtl3BnOmrtDazRj'; // synthetic: a secret drawn once by crypto.randomBytes

export interface FaultDatabase {
  url: string;
  /** Remove the file (and its WAL) or drop the schema. */
  dispose(): Promise<void>;
}

/** A database for one test file: a SQLite file in a new temporary folder (never :memory:), or a new schema. */
export function freshFaultDatabase(): FaultDatabase {
  if (testDialect() === 'postgres') {
    const url = freshTestDatabaseUrl();
    return { url, dispose: () => dropTestDatabase(url) };
  }
  // Only named here: the service makes the folder when it first opens the file, so a suite that
  // never runs (filtered out) leaves nothing behind.
  const folder = join(tmpdir(), `mvledger-faults-${process.pid}-${randomBytes(4).toString('hex')}`);
  return {
    url: `sqlite:${join(folder, 'ledger.sqlite')}`,
    dispose: async () => rmSync(folder, { recursive: true, force: true }),
  };
}

/** A service process on the database, the bootstrap key its admin key. */
export function startService(database: FaultDatabase, name: string, logLevel?: string): Promise<Instance> {
  return startInstance({
    name,
    databaseUrl: database.url,
    bootstrapKey: BOOTSTRAP_KEY,
    ...(logLevel ? { logLevel } : {}),
  });
}

/** How a child process ended. */
export interface Exit {
  code: number | null;
  signal: NodeJS.Signals | null;
}

/** Resolves when the child has exited (at once if it already has). */
export function exitOf(child: ChildProcess): Promise<Exit> {
  if (child.exitCode !== null || child.signalCode !== null)
    return Promise.resolve({ code: child.exitCode, signal: child.signalCode });
  return new Promise((resolve) => child.once('exit', (code, signal) => resolve({ code, signal })));
}

/** SIGKILL: no handler runs, no transaction is finished or rolled back by the process itself. */
export async function killHard(instance: Instance): Promise<Exit> {
  const exited = exitOf(instance.child);
  instance.child.kill('SIGKILL');
  return exited;
}

/** What became of a request: an answer, or a socket error (the process died or refused it). */
export type Outcome = { kind: 'answered'; status: number; text: string; json: any } | { kind: 'cut'; error: string };

export interface InFlight {
  /** Resolves once the whole body has been handed to the socket. */
  sent: Promise<void>;
  outcome: Promise<Outcome>;
}

/**
 * One request on its own connection (no keep-alive pool), through node:http
 * so the moment the body is fully sent is known.
 */
export function send(
  base: string,
  method: string,
  path: string,
  body?: unknown,
  key = BOOTSTRAP_KEY,
  extraHeaders: Record<string, string> = {},
): InFlight {
  const payload = body === undefined ? undefined : Buffer.from(JSON.stringify(body));
  let markSent: () => void = () => {};
  const sent = new Promise<void>((resolve) => (markSent = resolve));
  const outcome = new Promise<Outcome>((resolve) => {
    const headers: Record<string, string | number> = {
      ...extraHeaders,
      authorization: `Bearer ${key}`,
      connection: 'close',
    };
    if (payload) Object.assign(headers, { 'content-type': 'application/json', 'content-length': payload.length });
    const request = httpRequest(`${base}${path}`, { method, headers, agent: false }, (response) => {
      const chunks: Buffer[] = [];
      response.on('data', (chunk: Buffer) => chunks.push(chunk));
      response.on('end', () => {
        const text = Buffer.concat(chunks).toString();
        let json: any;
        try {
          json = text ? JSON.parse(text) : undefined;
        } catch {
          json = undefined;
        }
        resolve({ kind: 'answered', status: response.statusCode ?? 0, text, json });
      });
      response.on('error', (error) => resolve({ kind: 'cut', error: error.message }));
    });
    request.on('error', (error: NodeJS.ErrnoException) => {
      markSent();
      resolve({ kind: 'cut', error: error.code ?? error.message });
    });
    request.on('finish', markSent);
    request.end(payload);
  });
  return { sent, outcome };
}

/** Send and wait for the outcome. */
export function call(
  base: string,
  method: string,
  path: string,
  body?: unknown,
  key = BOOTSTRAP_KEY,
  extraHeaders: Record<string, string> = {},
): Promise<Outcome> {
  return send(base, method, path, body, key, extraHeaders).outcome;
}

/** The JSON of a 2xx answer, or fail naming what came back. */
export async function ok(outcome: Promise<Outcome> | Outcome, what: string): Promise<any> {
  const o = await outcome;
  if (o.kind !== 'answered' || o.status < 200 || o.status >= 300) {
    throw new Error(`${what}: ${o.kind === 'cut' ? `socket error ${o.error}` : `${o.status} ${o.text.slice(0, 300)}`}`);
  }
  return o.json;
}

export const sleep = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms));

/**
 * `count` daily readings from `start`, with whole-number quantities (so sums
 * compare exactly): synthetic, the test sets the truth.
 */
export function dailyBatch(start: string, count: number, salt = 0): { start: string; end: string; quantity: number }[] {
  return Array.from({ length: count }, (_, d) => {
    const day = addDays(start, d);
    return { start: day, end: addDays(day, 1), quantity: 100 + ((d * 37 + salt * 11) % 97) };
  });
}

export function sumOf(readings: readonly { quantity: number }[]): number {
  return readings.reduce((sum, r) => sum + r.quantity, 0);
}

/** Count and sum of a meter's stored readings starting in [from, to), straight from the table. */
export async function storedIn(
  store: Store,
  meterId: string,
  from: string,
  to: string,
): Promise<{ count: number; total: number }> {
  const row = await store.db
    .selectFrom('readings')
    .select((eb) => [eb.fn.countAll<string>().as('count'), eb.fn.sum<string>('quantity').as('total')])
    .where('meter_id', '=', meterId)
    .where('period_start', '>=', from)
    .where('period_start', '<', to)
    .executeTakeFirstOrThrow();
  return { count: Number(row.count), total: Number(row.total ?? 0) };
}

/** The audit rows of the store with one action, oldest first. */
export async function auditRows(store: Store, action: string) {
  return store.db.selectFrom('audit_log').selectAll().where('action', '=', action).orderBy('seq').execute();
}

/** The rows every fault test starts from, made through the API. */
export interface Ledger {
  stationId: string;
  facilityId: string;
  /** The meter the reading batches go to. */
  meterId: string;
  /** A meter with two years of monthly bills inside the station's weather, fit for baselines. */
  baselineMeterId: string;
  /** Audit rows so far: the bootstrap's two, and one per write here. */
  writes: number;
}

/** The baseline window of `baselineMeterId`. */
export const BASELINE_WINDOW = { start: '2023-01-01', end: '2025-01-01' } as const;

/**
 * An invented station with two years of daily weather, a facility, a meter
 * for the batches and a meter with 24 monthly bills: synthetic, the test sets the truth.
 */
export async function seedLedger(base: string): Promise<Ledger> {
  const random = seededRandom(61);
  const weather = dailyWeather(CLIMATES.temperate, BASELINE_WINDOW.start, 731, random);
  const station = await ok(
    call(base, 'POST', '/v1/weather-stations', { name: 'Invented fault-test station', temperatureUnit: 'F' }),
    'station',
  );
  await ok(
    call(base, 'PUT', `/v1/weather-stations/${station.id}/observations`, {
      observations: weather.map((d) => ({ date: d.date, temp: d.temp })),
    }),
    'weather',
  );
  const facility = await ok(call(base, 'POST', '/v1/facilities', { name: 'Fault-test hall (invented)' }), 'facility');
  const meterBody = (name: string) => ({ name, fuel: 'electricity', unit: 'kWh', weatherStationId: station.id });
  const meter = await ok(call(base, 'POST', `/v1/facilities/${facility.id}/meters`, meterBody('Batch meter')), 'meter');
  const baselineMeter = await ok(
    call(base, 'POST', `/v1/facilities/${facility.id}/meters`, meterBody('Baseline meter')),
    'baseline meter',
  );
  const bills = monthlyReadings(SAMPLE_BUILDING, weather, BASELINE_WINDOW.start, 24, random).map((r) => ({
    start: r.start,
    end: r.end,
    quantity: r.quantity,
  }));
  await ok(call(base, 'POST', `/v1/meters/${baselineMeter.id}/readings`, { readings: bills }), 'bills');
  // bootstrap (organisation, key) 2 + station, weather, facility, two meters, bills 6
  return {
    stationId: station.id,
    facilityId: facility.id,
    meterId: meter.id,
    baselineMeterId: baselineMeter.id,
    writes: 8,
  };
}
