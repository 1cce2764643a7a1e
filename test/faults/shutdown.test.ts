/**
 * Graceful shutdown: SIGTERM arrives while large reading batches are in
 * flight. The service stops taking connections at once, finishes the
 * requests it has (each answered 201 and stored whole, with its audit row),
 * closes the database and exits with code 0.
 * Runs on a temporary SQLite file, or a fresh PostgreSQL schema in the
 * postgres project. Check values: synthetic (the test sets the truth) and the
 * API contract.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { addDays } from '../../src/engine/index.js';
import { openStore, type Store } from '../../src/store/connect.js';
import { verifyAuditChain } from '../../src/store/audit.js';
import { testDialect } from '../support/database.js';
import { describeOutputs, stopInstance, type Instance } from '../multi-instance/support.js';
import {
  call,
  dailyBatch,
  exitOf,
  freshFaultDatabase,
  seedLedger,
  send,
  sleep,
  startService,
  storedIn,
  sumOf,
  type Outcome,
} from './support.js';

/** Batches in flight at the signal, each large enough to take a few hundred milliseconds. */
const IN_FLIGHT = 3;
const BATCH_READINGS = 20_000;
const FIRST_DAY = '1900-01-01';
const onPostgres = testDialect() === 'postgres';
/** How often a new connection is tried after the signal. */
const PROBE_EVERY_MS = 5;

describe(`graceful shutdown on ${testDialect()}: SIGTERM with requests in flight`, () => {
  const database = freshFaultDatabase();
  let instance: Instance | undefined;
  let store: Store | undefined;

  afterAll(async () => {
    if (instance) await stopInstance(instance);
    await store?.close();
    await database.dispose();
  });

  it('finishes the requests in flight, refuses new connections, stores every batch whole and exits 0', async ({
    onTestFailed,
  }) => {
    onTestFailed(() => console.error(instance ? describeOutputs([instance]) : '(no instance)'));
    instance = await startService(database, 'shutdown', 'info');
    const { base } = instance;
    const ledger = await seedLedger(base);
    const exited = exitOf(instance.child);

    const batches = Array.from({ length: IN_FLIGHT }, (_, i) =>
      dailyBatch(addDays(FIRST_DAY, i * BATCH_READINGS), BATCH_READINGS, i),
    );
    const readingsPath = `/v1/meters/${ledger.meterId}/readings`;
    const receivedBefore = instance.requestsReceived(readingsPath);
    const flights = batches.map((readings) =>
      send(base, 'POST', `/v1/meters/${ledger.meterId}/readings`, { readings }),
    );
    // Each outcome stamped with when it arrived, to order it against the first refusal.
    const settled = flights.map((f) => f.outcome.then((outcome) => ({ outcome, at: performance.now() })));
    await Promise.all(flights.map((f) => f.sent));
    // In flight means received: wait until the service has logged each batch's request (on a loaded
    // machine a request written to the socket may not have been read yet, and would then arrive closing).
    const inFlight = () => instance!.requestsReceived(readingsPath) - receivedBefore;
    for (const waitUntil = performance.now() + 30_000; inFlight() < IN_FLIGHT && performance.now() < waitUntil;)
      await sleep(PROBE_EVERY_MS);
    expect(inFlight()).toBe(IN_FLIGHT);
    const signalAt = performance.now();
    instance.child.kill('SIGTERM');

    // New connections until one is refused. A connection the kernel took before the listening socket
    // closed may still be served (200), told the server is closing (503), or dropped unread.
    const probes: Outcome[] = [];
    let refusedAt = 0;
    while (performance.now() - signalAt < 10_000) {
      const probe = await call(base, 'GET', '/healthz');
      probes.push(probe);
      if (probe.kind === 'cut' && probe.error === 'ECONNREFUSED') {
        refusedAt = performance.now();
        break;
      }
      await sleep(PROBE_EVERY_MS);
    }
    const last = probes.at(-1);
    expect(last?.kind === 'cut' && last.error).toBe('ECONNREFUSED'); // the listening socket is closed
    for (const probe of probes.slice(0, -1)) {
      expect(probe.kind === 'answered' ? probe.status : probe.error).toBeOneOf([
        200,
        503,
        'ECONNRESET',
        'socket hang up',
      ]); // fastify: 503 while closing
    }

    const answers = await Promise.all(settled);
    // On PostgreSQL the refusal comes while the batches are still being worked on. On SQLite the
    // process may not even see the signal until they are done: better-sqlite3 answers synchronously,
    // so a batch's transaction never yields to the event loop (reported in the summary line).
    const refusedWhileBusy = answers.some((a) => a.at > refusedAt);
    if (onPostgres) expect(refusedWhileBusy).toBe(true);
    for (const { outcome } of answers) {
      expect(outcome.kind === 'answered' && [outcome.status, outcome.json.created]).toEqual([201, BATCH_READINGS]); // the API contract: new readings
    }
    const exit = await exited;
    const exitAt = performance.now();
    expect(exit).toEqual({ code: 0, signal: null }); // src/server.ts: a clean stop exits 0

    store = openStore(database.url);
    for (const readings of batches) {
      const start = readings[0]!.start;
      expect(await storedIn(store, ledger.meterId, start, addDays(start, BATCH_READINGS))).toEqual({
        count: BATCH_READINGS,
        total: sumOf(readings),
      }); // synthetic: what was sent
    }
    const organisation = await store.db.selectFrom('organisations').select('id').executeTakeFirstOrThrow();
    const verdict = await verifyAuditChain(store.db, organisation.id);
    expect(verdict).toMatchObject({ ok: true, checked: ledger.writes + IN_FLIGHT }); // one row per batch: synthetic

    const lastAnswerAt = Math.max(...answers.map((a) => a.at));
    console.log(
      `[faults/shutdown ${testDialect()}] SIGTERM with ${IN_FLIGHT} batches of ${BATCH_READINGS} readings in flight: new connections refused after ${Math.round(refusedAt - signalAt)} ms ` +
        `(${refusedWhileBusy ? 'while batches were still in flight' : 'once all batches were answered'}; ${probes.length - 1} probe(s) taken before it, answered ${JSON.stringify(probes.slice(0, -1).map((p) => (p.kind === 'answered' ? p.status : p.error)))}), last batch answered 201 after ${Math.round(lastAnswerAt - signalAt)} ms, exit code ${exit.code} after ${Math.round(exitAt - signalAt)} ms; ` +
        `${IN_FLIGHT} of ${IN_FLIGHT} batches stored whole, audit chain ${verdict.checked} rows verified`,
    );
  });
});
