/**
 * Crash safety: the service process is killed with SIGKILL (no handler runs)
 * while a large reading batch is in flight, and right after a freeze is
 * sent, then restarted on the same database. Whatever the moment of the
 * kill, a batch is stored whole or not at all, an answered batch is stored,
 * a baseline is a draft or frozen under a hash that verifies (never frozen
 * without one), and the audit chain verifies with exactly one row per
 * committed write. A client that retries after the socket error gets its
 * batch stored, or told it is already there.
 * Runs on a temporary SQLite file, or a fresh PostgreSQL schema in the
 * postgres project. Check values: synthetic (the test sets the truth) and the
 * API contract.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { addDays } from '../../src/engine/index.js';
import { openStore, type Store } from '../../src/store/connect.js';
import { verifyAuditChain } from '../../src/store/audit.js';
import { verifyBaselineContent } from '../../src/store/baseline-content.js';
import { seededRandom } from '../support/synthetic.js';
import { testDialect } from '../support/database.js';
import { describeOutputs, stopInstance, type Instance } from '../multi-instance/support.js';
import {
  BASELINE_WINDOW,
  auditRows,
  call,
  dailyBatch,
  freshFaultDatabase,
  killHard,
  ok,
  seedLedger,
  send,
  sleep,
  startService,
  storedIn,
  sumOf,
  type Outcome,
} from './support.js';

/** Daily readings per batch: a large batch keeps the request in flight long enough to be hit. */
const BATCH_READINGS = 20_000;
/** Kills aimed at a reading batch in flight, and at a freeze in flight (each kill costs a restart of about 2 s). */
const BATCH_KILLS = 5;
const FREEZE_KILLS = 1;
/** Batch i covers BATCH_READINGS days from FIRST_DAY + i·BATCH_READINGS: disjoint, far from the baseline window. */
const FIRST_DAY = '1800-01-01';

interface Batch {
  start: string;
  end: string;
  count: number;
  total: number;
  outcome: Outcome;
  /** Stored rows found after the restart: 0 or count. */
  found: number;
}

describe(`crash safety on ${testDialect()}: SIGKILL during writes, restart on the same database`, () => {
  const database = freshFaultDatabase();
  let instance: Instance | undefined;
  let store: Store | undefined;

  afterAll(async () => {
    if (instance) await stopInstance(instance);
    await store?.close();
    await database.dispose();
  });

  it('keeps each batch whole or absent, each baseline draft or sealed, and one audit row per committed write', async ({
    onTestFailed,
  }) => {
    onTestFailed(() => console.error(instance ? describeOutputs([instance]) : '(no instance)'));
    const random = seededRandom(1303);
    let generation = 0;
    const restart = async () => {
      instance = await startService(database, `crash-${generation++}`);
      return instance.base;
    };
    let base = await restart();
    const ledger = await seedLedger(base);
    let writes = ledger.writes;
    const readingsPath = `/v1/meters/${ledger.meterId}/readings`;
    const batchAt = (i: number) => dailyBatch(addDays(FIRST_DAY, i * BATCH_READINGS), BATCH_READINGS, i);

    // An answered batch first, to learn how long one takes: the kills are aimed inside that span.
    const batches: Batch[] = [];
    const firstReadings = batchAt(0);
    const timed = send(base, 'POST', readingsPath, { readings: firstReadings });
    await timed.sent;
    const sentAt = performance.now();
    const firstOutcome = await timed.outcome;
    const batchMs = performance.now() - sentAt;
    expect(firstOutcome).toMatchObject({ kind: 'answered', status: 201 }); // the API contract: new readings
    writes++;
    batches.push({
      start: firstReadings[0]!.start,
      end: addDays(firstReadings[0]!.start, BATCH_READINGS),
      count: BATCH_READINGS,
      total: sumOf(firstReadings),
      outcome: firstOutcome,
      found: BATCH_READINGS,
    });

    let cutMidRequest = 0;
    for (let k = 1; k <= BATCH_KILLS; k++) {
      const readings = batchAt(k);
      const start = readings[0]!.start;
      const end = addDays(start, BATCH_READINGS);
      const flight = send(base, 'POST', readingsPath, { readings });
      await flight.sent;
      // Anywhere from just after the body is sent to a little past the measured time of a batch.
      await sleep(random.uniform() * batchMs * 1.2);
      await killHard(instance!);
      const outcome = await flight.outcome;
      if (outcome.kind === 'cut') cutMidRequest++;

      base = await restart();
      // Lists answer in pages (at most 10,000 readings): follow nextCursor to count the whole window.
      let found = 0;
      let cursor: string | null = null;
      do {
        const page = `${readingsPath}?from=${start}&to=${end}&limit=10000${cursor ? `&cursor=${encodeURIComponent(cursor)}` : ''}`;
        const listed = await ok(call(base, 'GET', page), 'readings after restart');
        found += listed.readings.length as number;
        cursor = listed.nextCursor as string | null;
      } while (cursor);
      expect([0, BATCH_READINGS], `batch ${k}: ${found} of ${BATCH_READINGS} readings stored`).toContain(found); // all or nothing
      if (outcome.kind === 'answered') {
        expect(outcome.status).toBe(201); // the API contract: new, disjoint readings
        expect(found).toBe(BATCH_READINGS); // answered means committed
      }
      if (found > 0) writes++;
      batches.push({ start, end, count: BATCH_READINGS, total: sumOf(readings), outcome, found });
    }

    // A freeze answered first, to learn how long one takes; then freezes (each superseding the
    // frozen version, on a new draft) killed anywhere from just after sending to a little past that.
    const freezeAt = async (note: string, supersedeReason?: string) => {
      const draft = await ok(
        call(base, 'POST', `/v1/meters/${ledger.baselineMeterId}/baselines`, BASELINE_WINDOW),
        'draft',
      );
      writes++;
      return {
        draftId: draft.id as string,
        flight: send(base, 'POST', `/v1/baselines/${draft.id}/freeze`, {
          note,
          ...(supersedeReason ? { supersedeReason } : {}),
        }),
      };
    };
    const first = await freezeAt('first freeze under test');
    await first.flight.sent;
    const freezeSentAt = performance.now();
    expect(await first.flight.outcome).toMatchObject({ kind: 'answered', status: 200 }); // the API contract
    const freezeMs = performance.now() - freezeSentAt;
    writes++;
    const frozenIds = [first.draftId];
    const killedFreezes: { draftId: string; outcome: Outcome; frozen: boolean }[] = [];
    for (let k = 1; k <= FREEZE_KILLS; k++) {
      const { draftId, flight } = await freezeAt(`freeze under test, round ${k}`, `refit in round ${k}`);
      await flight.sent;
      await sleep(random.uniform() * freezeMs * 1.5);
      await killHard(instance!);
      const outcome = await flight.outcome;
      if (outcome.kind === 'cut') cutMidRequest++;

      base = await restart();
      const seen = await ok(call(base, 'GET', `/v1/baselines/${draftId}`), 'baseline after restart');
      expect(['draft', 'frozen']).toContain(seen.status); // never half frozen
      if (seen.status === 'frozen') {
        expect(seen.contentHash).toMatch(/^[0-9a-f]{64}$/); // sealed: a SHA-256
        expect(seen.verified).toBe(true); // its content still gives the hash
      } else {
        expect(seen.contentHash).toBeNull(); // the API contract: a draft has no hash
      }
      if (outcome.kind === 'answered') expect([outcome.status, seen.status]).toEqual([200, 'frozen']); // answered means committed
      // The version it replaces is superseded in the same transaction, or stays frozen.
      const previous = await ok(call(base, 'GET', `/v1/baselines/${frozenIds.at(-1)}`), 'previous baseline');
      expect(previous.status).toBe(seen.status === 'frozen' ? 'superseded' : 'frozen');
      expect(previous.verified).toBe(true); // superseding keeps the content and its hash
      const frozen = seen.status === 'frozen';
      if (frozen) {
        writes += 2; // the supersede row and the freeze row
        frozenIds.push(draftId);
      }
      killedFreezes.push({ draftId, outcome, frozen });
    }

    // The same, straight from the tables, with the service running on the recovered database.
    store = openStore(database.url);
    for (const batch of batches) {
      const stored = await storedIn(store, ledger.meterId, batch.start, batch.end);
      expect(stored).toEqual(batch.found === 0 ? { count: 0, total: 0 } : { count: batch.count, total: batch.total }); // synthetic: the batch sent
    }
    const present = batches.filter((b) => b.found > 0);
    // Each committed batch has exactly one post-readings row, naming exactly its readings; no other has one.
    const readingRows = (await auditRows(store, 'post-readings')).filter((row) => row.entity_id === ledger.meterId);
    const audited = readingRows.map((row) => {
      const created = JSON.parse(row.after_json ?? '{}').created as { start: string; quantity: number }[];
      return {
        start: created[0]!.start,
        count: created.length,
        total: created.reduce((sum, c) => sum + c.quantity, 0),
      };
    });
    expect(audited).toEqual(present.map((b) => ({ start: b.start, count: b.count, total: b.total })));

    const baselines = await store.db
      .selectFrom('baselines')
      .selectAll()
      .where('meter_id', '=', ledger.baselineMeterId)
      .orderBy('version')
      .execute();
    expect(baselines).toHaveLength(FREEZE_KILLS + 1); // one draft per round
    for (const row of baselines) {
      if (row.status === 'draft') expect(row.content_hash).toBeNull();
      else expect(verifyBaselineContent(row)).toBe(true); // frozen or superseded: sealed, and the seal holds
    }
    expect(baselines.filter((b) => b.status === 'frozen').map((b) => b.id)).toEqual([frozenIds.at(-1)]); // one frozen baseline per meter, the last to commit
    expect((await auditRows(store, 'freeze')).map((r) => r.entity_id)).toEqual(frozenIds); // one row per committed freeze
    expect((await auditRows(store, 'supersede')).map((r) => r.entity_id)).toEqual(frozenIds.slice(0, -1));

    const organisationId =
      readingRows[0]?.organisation_id ??
      (await store.db.selectFrom('organisations').select('id').executeTakeFirstOrThrow()).id;
    const verdict = await verifyAuditChain(store.db, organisationId);
    expect(verdict.broken).toBeUndefined();
    expect(verdict).toMatchObject({ ok: true, checked: writes }); // counted by this test: synthetic

    // A client that saw its request cut off retries it: stored now if it was lost, "unchanged" if
    // it had landed. (One of each, when the kills gave both: each retry costs a batch.)
    const absent = batches.filter((b) => b.found === 0);
    const killed = batches.slice(1);
    const retries = [killed.find((b) => b.found === 0), killed.find((b) => b.found > 0)].filter(
      (b): b is Batch => b !== undefined,
    );
    for (const batch of retries) {
      const lost = batch.found === 0;
      const again = await call(base, 'POST', readingsPath, { readings: batchAt(batches.indexOf(batch)) });
      expect(again).toMatchObject({ kind: 'answered', status: lost ? 201 : 200 }); // the API contract: 201 new, 200 unchanged
      expect(again.kind === 'answered' && again.json.created).toBe(lost ? BATCH_READINGS : 0);
      if (lost) writes++; // an unchanged batch writes nothing and audits nothing
      batch.found = batch.count;
    }
    const after = await verifyAuditChain(store.db, organisationId);
    expect(after).toMatchObject({ ok: true, checked: writes });
    for (const batch of batches) {
      expect(await storedIn(store, ledger.meterId, batch.start, batch.end)).toEqual(
        batch.found === 0 ? { count: 0, total: 0 } : { count: batch.count, total: batch.total },
      );
    }

    const frozenCount = killedFreezes.filter((f) => f.frozen).length;
    console.log(
      `[faults/crash ${testDialect()}] kills ${BATCH_KILLS + FREEZE_KILLS} (${BATCH_KILLS} batches of ${BATCH_READINGS} readings, ${FREEZE_KILLS} freeze${FREEZE_KILLS === 1 ? '' : 's'}; batch ≈ ${Math.round(batchMs)} ms), ` +
        `${cutMidRequest} mid-request (socket error); batches present ${present.length - 1}, absent ${absent.length} of ${BATCH_KILLS} killed; ` +
        `killed freezes committed ${frozenCount} of ${FREEZE_KILLS} (freeze ≈ ${Math.round(freezeMs)} ms); retried ${retries.length}; audit chain ${after.checked} rows verified`,
    );
  }, 180_000); // six restarts of a real process: slow on a loaded machine, never a measure of speed
});
