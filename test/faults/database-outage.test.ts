/**
 * PostgreSQL going away under load: the service runs as its own process on
 * a PostgreSQL cluster this test owns (own-postgres.ts), billing systems
 * post reading batches and readers ask for savings, reports and readiness,
 * while the test terminates the service's backends mid-query
 * (pg_terminate_backend, as a failover or an operator does), stops the
 * cluster cleanly and starts it again, and crashes it (immediate stop) and
 * starts it again. Checked (the API contract and common practice for a
 * service behind a load balancer):
 *  - the process never exits;
 *  - no answer is a 5xx other than 503, and every 503 is problem+json
 *    with Retry-After; /readyz names the database as unreachable while the
 *    cluster is down, and is ready again after;
 *  - no acknowledged write is lost: every batch answered 2xx is stored
 *    whole, and every audit chain verifies.
 * A client resends a batch that was not acknowledged (a re-sent batch that
 * was stored is reported unchanged). Runs once, in the sqlite project: it
 * brings its own cluster and never touches the shared one. Skipped, with a
 * warning, where the PostgreSQL binaries are absent. The figures are
 * printed in one summary line.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { addDays } from '../../src/engine/index.js';
import { sql } from 'kysely';
import { openStore, type Store, type StoreEvent } from '../../src/store/connect.js';
import { readSnapshot, writeTransaction } from '../../src/store/transactions.js';
import { databaseFault } from '../../src/store/faults.js';
import { verifyAllAuditChains } from '../../src/store/audit.js';
import { testDialect } from '../support/database.js';
import { CLIMATES, SAMPLE_BUILDING, dailyWeather, monthlyReadings, seededRandom } from '../support/synthetic.js';
import { describeOutputs, startInstance, stopInstance, type Instance } from '../multi-instance/support.js';
import {
  BASELINE_WINDOW,
  BOOTSTRAP_KEY,
  call,
  dailyBatch,
  ok,
  seedLedger,
  sleep,
  storedIn,
  sumOf,
  type Ledger,
} from './support.js';
import { createOwnCluster, ownClusterUnavailable, type OwnCluster } from './own-postgres.js';

const WRITERS = 3;
const READERS = 3;
/** Daily readings per batch; each writer owns its own run of days, far from the baseline window. */
const BATCH = 100;
const FIRST_DAY = '1900-01-01';
const PROBE_TIMEOUT_MS = 15_000;

const unavailable = ownClusterUnavailable();
const wrongProject = testDialect() === 'postgres';
if (unavailable !== null && !wrongProject) console.warn(`database-outage test skipped: ${unavailable}`);

/** Where the cluster is: serving (backends may be terminated), or stopping, down and starting again. */
type Phase = 'up' | 'restarting';

interface Tally {
  probes: number;
  byStatus: Record<string, number>;
  /** 503 answers by phase and by reads (GET) and writes. */
  unavailable: Record<`${Phase} ${'read' | 'write'}`, number>;
  /** Answers of 5xx other than 503. */
  otherServerErrors: { what: string; status: number; text: string }[];
  /** 503s without problem+json or Retry-After. */
  badUnavailable: string[];
  /** Requests that got no answer (socket error or timeout): the process stays up, so there should be none. */
  unanswered: { what: string; error: string }[];
}

interface Acknowledged {
  start: string;
  end: string;
  count: number;
  total: number;
}

describe.skipIf(unavailable !== null || wrongProject)(
  'PostgreSQL connection loss and restarts under load (the test’s own cluster)',
  () => {
    let cluster: OwnCluster;
    let instance: Instance;
    let ledger: Ledger;
    let store: Store | undefined;
    let exits = 0;

    beforeAll(async () => {
      cluster = await createOwnCluster();
      instance = await startInstance({ name: 'outage', databaseUrl: cluster.url, bootstrapKey: BOOTSTRAP_KEY });
      instance.child.once('exit', () => exits++);
      ledger = await seedLedger(instance.base);
      // synthetic: the test sets the truth. A reporting half-year with its weather, and the baseline frozen, so savings and reports have figures.
      const random = seededRandom(62);
      const weather = dailyWeather(CLIMATES.temperate, BASELINE_WINDOW.end, 181, random);
      await ok(
        call(instance.base, 'PUT', `/v1/weather-stations/${ledger.stationId}/observations`, {
          observations: weather.map((d) => ({ date: d.date, temp: d.temp })),
        }),
        'reporting weather',
      );
      const bills = monthlyReadings({ ...SAMPLE_BUILDING, base: 250 }, weather, BASELINE_WINDOW.end, 5, random).map(
        (r) => ({
          start: r.start,
          end: r.end,
          quantity: r.quantity,
        }),
      );
      await ok(
        call(instance.base, 'POST', `/v1/meters/${ledger.baselineMeterId}/readings`, { readings: bills }),
        'reporting bills',
      );
      const draft = await ok(
        call(instance.base, 'POST', `/v1/meters/${ledger.baselineMeterId}/baselines`, BASELINE_WINDOW),
        'baseline',
      );
      await ok(
        call(instance.base, 'POST', `/v1/baselines/${draft.id}/freeze`, {
          note: 'Agreed in the invented M&V plan (test)',
        }),
        'freeze',
      );
    }, 60_000);

    afterAll(async () => {
      await store?.close();
      if (instance) await stopInstance(instance);
      await cluster?.dispose();
    });

    it('answers 503 while the database is away, never exits, and loses no acknowledged write', async () => {
      const tally: Tally = {
        probes: 0,
        byStatus: {},
        unavailable: { 'up read': 0, 'up write': 0, 'restarting read': 0, 'restarting write': 0 },
        otherServerErrors: [],
        badUnavailable: [],
        unanswered: [],
      };
      const acknowledged: Acknowledged[] = [];
      let loading = true;
      let phase: Phase = 'up';

      async function probe(
        what: string,
        method: string,
        path: string,
        body?: unknown,
      ): Promise<{ status: number; json: any } | null> {
        tally.probes++;
        try {
          const response = await fetch(`${instance.base}${path}`, {
            method,
            headers: {
              authorization: `Bearer ${BOOTSTRAP_KEY}`,
              ...(body === undefined ? {} : { 'content-type': 'application/json' }),
            },
            ...(body === undefined ? {} : { body: JSON.stringify(body) }),
            signal: AbortSignal.timeout(PROBE_TIMEOUT_MS),
          });
          const text = await response.text();
          tally.byStatus[response.status] = (tally.byStatus[response.status] ?? 0) + 1;
          if (response.status >= 500 && response.status !== 503)
            tally.otherServerErrors.push({ what, status: response.status, text: text.slice(0, 300) });
          if (response.status === 503) tally.unavailable[`${phase} ${method === 'GET' ? 'read' : 'write'}`]++;
          if (
            response.status === 503 &&
            (!/^application\/problem\+json/.test(response.headers.get('content-type') ?? '') ||
              !response.headers.get('retry-after'))
          ) {
            tally.badUnavailable.push(
              `${what}: ${response.headers.get('content-type')} retry-after ${response.headers.get('retry-after')}`,
            );
          }
          let json: any;
          try {
            json = JSON.parse(text);
          } catch {
            json = undefined;
          }
          return { status: response.status, json };
        } catch (error) {
          tally.unanswered.push({ what, error: error instanceof Error ? error.message : String(error) });
          return null;
        }
      }

      // Billing systems: each posts its own batches, resending one until it is acknowledged.
      const writer = async (w: number) => {
        for (let i = 0; loading; i++) {
          const readings = dailyBatch(addDays(FIRST_DAY, (w * 1000 + i) * BATCH), BATCH, w);
          while (loading) {
            const answer = await probe(`writer ${w} batch ${i}`, 'POST', `/v1/meters/${ledger.meterId}/readings`, {
              readings,
            });
            if (answer && answer.status >= 200 && answer.status < 300) {
              acknowledged.push({
                start: readings[0]!.start,
                end: readings.at(-1)!.end,
                count: readings.length,
                total: sumOf(readings),
              });
              break;
            }
            await sleep(100);
          }
        }
      };
      const reader = async (r: number) => {
        const paths = [
          `/v1/meters/${ledger.baselineMeterId}/savings`,
          `/v1/reports/savings?from=2025-01-01&to=2025-06-01&facilityId=${ledger.facilityId}`,
          '/readyz',
          `/v1/meters/${ledger.meterId}/readings?from=1900-01-01&to=1900-03-01`,
        ];
        for (let i = r; loading; i++) {
          await probe(`reader ${r}`, 'GET', paths[i % paths.length]!);
          await sleep(20);
        }
      };

      const faults = { terminations: 0, backendsEnded: 0, restarts: 0, crashes: 0, readyWhileDown: [] as unknown[] };
      const terminateFor = async (ms: number) => {
        const until = Date.now() + ms;
        while (Date.now() < until) {
          await sleep(600);
          faults.terminations++;
          faults.backendsEnded += await cluster.terminateBackends();
        }
      };
      const down = async (mode: 'fast' | 'immediate') => {
        phase = 'restarting';
        await cluster.stop(mode);
        if (mode === 'fast') faults.restarts++;
        else faults.crashes++;
        const ready = await probe('readyz while down', 'GET', '/readyz');
        faults.readyWhileDown.push(ready?.json);
        await sleep(1200);
        await cluster.start();
        // The pool finds its way back within moments of the server accepting connections.
        await sleep(300);
        phase = 'up';
      };

      const load = [
        ...Array.from({ length: WRITERS }, (_, w) => writer(w)),
        ...Array.from({ length: READERS }, (_, r) => reader(r)),
      ];
      await sleep(500);
      await terminateFor(3000);
      await down('fast');
      await terminateFor(2000);
      await down('immediate');
      await terminateFor(1500);
      loading = false;
      await Promise.all(load);

      // The database is back: the service is ready again without a restart.
      let ready: { status: number; json: any } | null = null;
      for (let attempt = 0; attempt < 50 && ready?.status !== 200; attempt++) {
        ready = await probe('readyz after', 'GET', '/readyz');
        if (ready?.status !== 200) await sleep(200);
      }

      store = openStore(cluster.url);
      let lost = 0;
      for (const batch of acknowledged) {
        const found = await storedIn(store, ledger.meterId, batch.start, batch.end);
        // A batch is stored whole or it counts as lost whole (a partial batch would break all-or-nothing too).
        if (found.count !== batch.count || found.total !== batch.total) lost += batch.count;
      }
      const chains = await verifyAllAuditChains(store.db);
      const retried = (instance.output().match(/"event":"(read-retried|transaction-start-retried)"/g) ?? []).length;
      const figures = {
        probes: tally.probes,
        byStatus: tally.byStatus,
        unavailable: tally.unavailable,
        otherServerErrors: tally.otherServerErrors.length,
        unanswered: tally.unanswered.length,
        processExits: exits,
        acknowledgedBatches: acknowledged.length,
        acknowledgedReadings: acknowledged.reduce((n, b) => n + b.count, 0),
        acknowledgedReadingsLost: lost,
        retriedOnAFreshConnection: retried,
        ...faults,
        readyWhileDown: undefined,
      };
      console.log(`database-outage summary ${JSON.stringify(figures)}`);

      const why = `\n${JSON.stringify({ otherServerErrors: tally.otherServerErrors.slice(0, 5), unanswered: tally.unanswered.slice(0, 5), badUnavailable: tally.badUnavailable.slice(0, 5) })}\n${describeOutputs([instance]).slice(-4000)}`;
      expect(exits, why).toBe(0);
      expect(instance.child.exitCode, why).toBeNull();
      expect(tally.otherServerErrors, why).toEqual([]);
      expect(tally.unanswered, why).toEqual([]);
      expect(tally.badUnavailable, why).toEqual([]);
      expect(lost, why).toBe(0);
      expect(chains.ok, JSON.stringify(chains)).toBe(true);
      expect(ready?.status, why).toBe(200);
      // The faults did happen: backends ended mid-load, the database refused, and readiness said so.
      expect(faults.backendsEnded).toBeGreaterThan(0);
      expect(tally.byStatus['503'] ?? 0).toBeGreaterThan(0);
      expect(acknowledged.length).toBeGreaterThan(0);
      for (const body of faults.readyWhileDown)
        expect(body).toMatchObject({ status: 503, database: 'unreachable', title: 'Not available right now' });
    }, 90_000);

    it('retries a read whose backend is terminated mid-query, once, and never a write', async () => {
      const events: StoreEvent[] = [];
      const own = openStore(cluster.url, { onEvent: (event) => events.push(event) });
      try {
        await sql`create table if not exists outage_probe (n integer not null)`.execute(own.db);
        // Terminate every backend while each statement sleeps inside the server.
        const midQuery = async <T>(work: Promise<T>): Promise<T> => {
          await sleep(150);
          expect(await cluster.terminateBackends()).toBeGreaterThan(0);
          return work;
        };

        // A plain read: answered from a fresh connection.
        const read = await midQuery(sql<{ answer: number }>`select 7 as answer from pg_sleep(0.6)`.execute(own.db));
        expect(read.rows).toEqual([{ answer: 7 }]);
        expect(events.filter((e) => e.event === 'read-retried')).toHaveLength(1);

        // A read snapshot (a report's reads): read again whole.
        const snapshot = await midQuery(
          readSnapshot(
            own.db,
            async (trx) => (await sql<{ answer: number }>`select 8 as answer from pg_sleep(0.6)`.execute(trx)).rows,
          ),
        );
        expect(snapshot).toEqual([{ answer: 8 }]);

        // A write: not retried; it fails as a lost connection, and nothing of it is stored.
        const write = writeTransaction(own.db, 'org_outage_probe', async (trx) => {
          await sql`insert into outage_probe (n) values (1)`.execute(trx);
          await sql`select pg_sleep(0.6)`.execute(trx);
        });
        const failed = await midQuery(
          write.then(
            () => null,
            (error: unknown) => error,
          ),
        );
        expect(databaseFault(failed)).toBe('connection-lost');
        expect((await sql<{ n: string }>`select count(*) as n from outage_probe`.execute(own.db)).rows[0]!.n).toBe('0');
        // Every dropped connection was heard (an unheard one would have ended this process).
        expect(events.some((e) => e.event === 'connection-error')).toBe(true);
      } finally {
        await own.close();
      }
    }, 30_000);
  },
);
