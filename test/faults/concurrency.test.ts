/**
 * Many clients writing at once: reading batches on disjoint periods, weather
 * on disjoint dates and on the same dates, and baseline drafts, all against
 * one service process on a SQLite file (SQLite has one writer: the others
 * must wait, never fail), then two processes on that file (a second process,
 * such as the command line, must wait for the write lock too), or two
 * processes on one PostgreSQL schema. No
 * client may see a 5xx or a "database is locked"/busy error; no write may be
 * lost or doubled (counts and sums match what was sent); writes to the same
 * dates land whole, the last one in the audit trail being what is stored;
 * the audit chain verifies with exactly one row per successful write.
 * Check values: synthetic (the test sets the truth) and the API contract.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { addDays } from '../../src/engine/index.js';
import { openStore, type Store } from '../../src/store/connect.js';
import { verifyAuditChain } from '../../src/store/audit.js';
import { seededRandom } from '../support/synthetic.js';
import { testDialect } from '../support/database.js';
import {
  clientOf,
  describeOutputs,
  stopInstance,
  type Answer,
  type Client,
  type Instance,
} from '../multi-instance/support.js';
import {
  BASELINE_WINDOW,
  BOOTSTRAP_KEY,
  auditRows,
  dailyBatch,
  freshFaultDatabase,
  seedLedger,
  startService,
  storedIn,
  sumOf,
  type Ledger,
} from './support.js';

const onPostgres = testDialect() === 'postgres';
/**
 * Processes sharing the database. On SQLite, two processes once failed here:
 * a transaction that read before writing lost the write lock to the other
 * process and answered 500 (SQLITE_BUSY, SQLITE_BUSY_SNAPSHOT) at once, until
 * write transactions began IMMEDIATE (src/store/sqlite-connection.ts).
 */
const PROCESS_COUNTS = onPostgres ? [2] : [1, 2];

// synthetic: the test sets the truth. 16 clients: 8 post readings, 4 put weather, 4 fit drafts.
const READING_CLIENTS = 8;
const BATCHES_PER_CLIENT = 6;
const READINGS_PER_BATCH = 250;
const WEATHER_CLIENTS = 4;
/** Each weather client puts its own dates this many times (new dates each time), and the shared dates as often. */
const WEATHER_ROUNDS = 3;
const OWN_DAYS = 90;
const SHARED_DAYS = 60;
const SHARED_FROM = '1990-01-01';
const DRAFT_CLIENTS = 4;
const DRAFTS_PER_CLIENT = 2;
/** Reading batch n covers READINGS_PER_BATCH days from here: disjoint, away from the baseline window. */
const READINGS_FROM = '1950-01-01';

describe.each(PROCESS_COUNTS)(`many concurrent writers on ${testDialect()}, %i service process(es)`, (processCount) => {
  const database = freshFaultDatabase();
  const instances: Instance[] = [];
  const answers: Answer[] = [];
  const clients: Client[] = [];
  let store: Store | undefined;
  let ledger: Ledger;
  let weatherStationId = '';

  beforeAll(async () => {
    // On SQLite the first process creates and migrates the file before the second starts: kysely's
    // migrator takes no lock on SQLite, so two first starts at once both run migration 0001.
    // PostgreSQL instances start together (their racing start is test/multi-instance's subject).
    if (onPostgres) {
      const started = await Promise.allSettled(
        Array.from({ length: processCount }, (_, i) => startService(database, `writer-${i}`)),
      );
      for (const result of started) if (result.status === 'fulfilled') instances.push(result.value); // stopped by afterAll, even if another failed
      const failed = started.flatMap((r) => (r.status === 'rejected' ? [String(r.reason)] : []));
      if (failed.length > 0) throw new Error(failed.join('\n'));
    } else {
      for (let i = 0; i < processCount; i++) instances.push(await startService(database, `writer-${i}`));
    }
    for (const instance of instances) clients.push(clientOf(instance, BOOTSTRAP_KEY, answers));
    ledger = await seedLedger(instances[0]!.base);
    const station = await clients[0]!('POST', '/v1/weather-stations', {
      name: 'Invented crowded station',
      temperatureUnit: 'C',
    });
    expect(station.status).toBe(201);
    weatherStationId = station.json.id;
    store = openStore(database.url);
  });

  afterAll(async () => {
    await Promise.allSettled(instances.map((instance) => stopInstance(instance)));
    await store?.close();
    await database.dispose();
  });

  it('loses, doubles and fails nothing, and audits each write once', async ({ onTestFailed }) => {
    onTestFailed(() => {
      const bad = answers.filter((a) => a.status >= 300).slice(0, 10);
      console.error(
        `${bad.map((a) => `${a.instance} ${a.method} ${a.path} → ${a.status}: ${a.text.slice(0, 300)}`).join('\n')}\n${describeOutputs(instances)}`,
      );
    });
    const random = seededRandom(4242);
    const via = (client: number): Client => clients[client % clients.length]!;
    const readingsPath = `/v1/meters/${ledger.meterId}/readings`;
    const observationsPath = `/v1/weather-stations/${weatherStationId}/observations`;

    // Reading client c sends batches c·B … c·B + B − 1, one after another.
    const readingBatches = Array.from({ length: READING_CLIENTS * BATCHES_PER_CLIENT }, (_, n) =>
      dailyBatch(addDays(READINGS_FROM, n * READINGS_PER_BATCH), READINGS_PER_BATCH, n),
    );
    const readingClient = async (c: number) => {
      const results: Answer[] = [];
      for (let b = 0; b < BATCHES_PER_CLIENT; b++)
        results.push(await via(c)('POST', readingsPath, { readings: readingBatches[c * BATCHES_PER_CLIENT + b] }));
      return results;
    };

    // Weather client w alternates its own new dates with the shared dates, each put with values of its own.
    const ownDays = (w: number, round: number) => addDays('1980-01-01', (w * WEATHER_ROUNDS + round) * OWN_DAYS);
    const tempOf = (w: number, round: number, d: number) =>
      Math.round((5 + w * 3 + round + ((d * 7) % 11) / 10) * 10) / 10;
    const days = (from: string, count: number, w: number, round: number) =>
      Array.from({ length: count }, (_, d) => ({ date: addDays(from, d), temp: tempOf(w, round, d) }));
    const sharedPuts: { client: number; round: number; observations: { date: string; temp: number }[] }[] = [];
    const weatherClient = async (w: number) => {
      const results: { answer: Answer; shared: boolean }[] = [];
      for (let round = 0; round < WEATHER_ROUNDS; round++) {
        const shared = days(SHARED_FROM, SHARED_DAYS, w, round);
        sharedPuts.push({ client: w, round, observations: shared });
        const order = random.uniform() < 0.5 ? [false, true] : [true, false];
        for (const isShared of order) {
          const observations = isShared ? shared : days(ownDays(w, round), OWN_DAYS, w, round);
          results.push({ answer: await via(w + 1)('PUT', observationsPath, { observations }), shared: isShared });
        }
      }
      return results;
    };

    const draftClient = async (c: number) => {
      const results: Answer[] = [];
      for (let k = 0; k < DRAFTS_PER_CLIENT; k++)
        results.push(await via(c)('POST', `/v1/meters/${ledger.baselineMeterId}/baselines`, BASELINE_WINDOW));
      return results;
    };

    const [readingResults, weatherResults, draftResults] = await Promise.all([
      Promise.all(Array.from({ length: READING_CLIENTS }, (_, c) => readingClient(c))),
      Promise.all(Array.from({ length: WEATHER_CLIENTS }, (_, w) => weatherClient(w))),
      Promise.all(Array.from({ length: DRAFT_CLIENTS }, (_, c) => draftClient(c))),
    ]);

    // Nothing failed, nothing waited itself into an error (a refusal naming a locked or busy database included).
    const bad = answers.filter((a) => a.status >= 500 || (a.status >= 400 && /locked|busy|SQLITE_/i.test(a.text)));
    expect(bad.map((a) => `${a.instance} ${a.method} ${a.path} → ${a.status}: ${a.text.slice(0, 200)}`)).toEqual([]);

    // Readings: every batch stored once; the count and the sum are what was sent.
    const readingAnswers = readingResults.flat();
    expect(readingAnswers.map((a) => [a.status, a.json?.created])).toEqual(
      readingAnswers.map(() => [201, READINGS_PER_BATCH]),
    ); // the API contract
    const sent = readingBatches.flat();
    const span = { from: READINGS_FROM, to: addDays(READINGS_FROM, sent.length) };
    expect(await storedIn(store!, ledger.meterId, span.from, span.to)).toEqual({
      count: sent.length,
      total: sumOf(sent),
    }); // synthetic: what was sent
    const distinct = await store!.db
      .selectFrom('readings')
      .select('period_start')
      .distinct()
      .where('meter_id', '=', ledger.meterId)
      .execute();
    expect(distinct).toHaveLength(sent.length); // no period twice
    const readingRows = (await auditRows(store!, 'post-readings')).filter((row) => row.entity_id === ledger.meterId);
    const auditedStarts = readingRows
      .map((row) => (JSON.parse(row.after_json ?? '{}').created as { start: string }[])[0]!.start)
      .sort();
    expect(auditedStarts).toEqual(readingBatches.map((batch) => batch[0]!.start).sort()); // one row per batch

    // Weather, own dates: exactly what each client put.
    const weatherAnswers = weatherResults.flat();
    expect(weatherAnswers.map((r) => r.answer.status)).toEqual(weatherAnswers.map(() => 200)); // the API contract: PUT answers 200
    for (let w = 0; w < WEATHER_CLIENTS; w++) {
      for (let round = 0; round < WEATHER_ROUNDS; round++) {
        const from = ownDays(w, round);
        const listed = await via(w)('GET', `${observationsPath}?from=${from}&to=${addDays(from, OWN_DAYS)}`);
        expect(listed.json.observations.map((o: any) => [o.date, o.temp])).toEqual(
          days(from, OWN_DAYS, w, round).map((d) => [d.date, d.temp]),
        );
      }
    }
    // Weather, shared dates: created once, then updated by each later put; what is stored is one put
    // whole, the one the audit trail shows last.
    const sharedAnswers = weatherAnswers.filter((r) => r.shared).map((r) => r.answer.json);
    expect(sharedAnswers.reduce((n, r) => n + r.created, 0)).toBe(SHARED_DAYS); // each shared date created once
    expect(sharedAnswers.reduce((n, r) => n + r.updated, 0)).toBe(SHARED_DAYS * (sharedAnswers.length - 1)); // every later put changed each date
    const stored = await via(0)(
      'GET',
      `${observationsPath}?from=${SHARED_FROM}&to=${addDays(SHARED_FROM, SHARED_DAYS)}`,
    );
    const storedShared = stored.json.observations.map((o: any) => ({ date: o.date, temp: o.temp }));
    const wholePut = sharedPuts.filter((put) => JSON.stringify(put.observations) === JSON.stringify(storedShared));
    expect(wholePut).toHaveLength(1); // one put, whole, not a mix of several
    const weatherRows = (await auditRows(store!, 'upsert-observations')).filter(
      (row) => row.entity_id === weatherStationId,
    );
    expect(weatherRows).toHaveLength(weatherAnswers.length); // one row per put (each changed something)
    const lastShared = weatherRows.filter((row) => SHARED_FROM in JSON.parse(row.after_json ?? '{}')).at(-1)!;
    const lastAfter = JSON.parse(lastShared.after_json ?? '{}') as Record<string, { temp: number }>;
    expect(storedShared.map((o: any) => [o.date, lastAfter[o.date]?.temp])).toEqual(
      storedShared.map((o: any) => [o.date, o.temp]),
    );

    // Drafts: each fitted once, numbered 1…n without a gap or a repeat.
    const draftAnswers = draftResults.flat();
    expect(draftAnswers.map((a) => a.status)).toEqual(draftAnswers.map(() => 201)); // the API contract
    expect(draftAnswers.map((a) => a.json.version).sort((a, b) => a - b)).toEqual(draftAnswers.map((_, i) => i + 1));
    const draftRows = (await auditRows(store!, 'create')).filter((row) => row.entity_type === 'baseline');
    expect(draftRows.map((row) => row.entity_id).sort()).toEqual(draftAnswers.map((a) => a.json.id).sort());

    // One unbroken chain: the seed's writes, the station, and one row per answered write.
    const writes = ledger.writes + 1 + readingAnswers.length + weatherAnswers.length + draftAnswers.length;
    const verdict = await verifyAuditChain(store!.db, readingRows[0]!.organisation_id);
    expect(verdict.broken).toBeUndefined();
    expect(verdict).toMatchObject({ ok: true, checked: writes }); // counted by this test: synthetic

    console.log(
      `[faults/concurrency ${testDialect()}] ${READING_CLIENTS + WEATHER_CLIENTS + DRAFT_CLIENTS} clients on ${processCount} process(es): ` +
        `${readingAnswers.length} reading batches (${sent.length} readings), ${weatherAnswers.length} weather puts (${sharedAnswers.length} on the same ${SHARED_DAYS} dates), ` +
        `${draftAnswers.length} drafts; 5xx ${answers.filter((a) => a.status >= 500).length}, busy/locked 0, lost 0, doubled 0; audit chain ${verdict.checked} rows verified`,
    );
  });
});
