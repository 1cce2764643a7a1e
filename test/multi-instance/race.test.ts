/**
 * Two service processes on one PostgreSQL schema, raced against each other.
 * They start at once on a new, empty schema (both creating it, migrating and
 * bootstrapping with the same key); then requests are split between the
 * instances and sent at once. Whatever the
 * interleaving, the ledger must hold what one instance alone would have
 * stored: one winner among overlapping reading batches, every disjoint batch
 * stored once, one frozen baseline per meter, one facility per
 * Idempotency-Key, and one unbroken audit chain with a row per write.
 * PostgreSQL only (the postgres project); SQLite serves a single process.
 * Check values: synthetic (the test sets the truth) and the API contract.
 */
import { sql } from 'kysely';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { addDays } from '../../src/engine/index.js';
import { openStore, type Store } from '../../src/store/connect.js';
import { verifyAllAuditChains, verifyAuditChain } from '../../src/store/audit.js';
import { dropTestDatabase, freshTestDatabaseUrl, testDialect } from '../support/database.js';
import { CLIMATES, SAMPLE_BUILDING, dailyWeather, monthlyReadings, seededRandom } from '../support/synthetic.js';
import {
  clientOf,
  describeOutputs,
  startInstance,
  stopInstance,
  type Answer,
  type Client,
  type Instance,
} from './support.js';

// synthetic: the test sets the truth (matches the bootstrap key pattern of src/config.ts).
const BOOTSTRAP_KEY = 'mvl_racetest_HR1u0COStvcbKuf3IlnBWoUd9MJdfhX9CpGIgb7e'; // synthetic: a secret drawn once by crypto.randomBytes
/** Rounds per race: more rounds, more interleavings tried, still a few seconds. */
const ROUNDS = 3;

const onPostgres = testDialect() === 'postgres';

/** On a failed test: the 5xx answers (the first few) and what the services logged. */
function reportFailure(instances: readonly Instance[], answers: readonly Answer[]): void {
  const failures = answers.filter((a) => a.status >= 500);
  const listed = failures
    .slice(0, 10)
    .map((a) => `${a.instance} ${a.method} ${a.path} → ${a.status}: ${a.text.slice(0, 300)}`);
  const more = failures.length > listed.length ? `\n(and ${failures.length - listed.length} more)` : '';
  console.error(
    `${listed.length > 0 ? `5xx answers:\n${listed.join('\n')}${more}\n` : ''}service output:\n${describeOutputs(instances)}`,
  );
}

describe.skipIf(!onPostgres)(
  'two service instances on one PostgreSQL schema (skipped: needs the postgres project, MVLEDGER_TEST_DIALECT=postgres)',
  () => {
    let databaseUrl = '';
    const instances: Instance[] = [];
    let store: Store | undefined;
    let organisationIds: string[] = [];
    let organisationId = '';
    const answers: Answer[] = [];
    const clients: Client[] = [];
    /** Successful writes so far; each must have left exactly one audit row. */
    let writes = 0;

    /** Requests are split between the instances by index. */
    const via = (index: number): Client => clients[index % clients.length]!;

    beforeAll(async () => {
      databaseUrl = freshTestDatabaseUrl();
      // Both at once on the new, empty schema and both with the bootstrap key, as two replicas of
      // one deployment start: they race to create the schema, migrate and bootstrap, too.
      const started = await Promise.allSettled(
        ['instance-1', 'instance-2'].map((name) => startInstance({ name, databaseUrl, bootstrapKey: BOOTSTRAP_KEY })),
      );
      for (const result of started) if (result.status === 'fulfilled') instances.push(result.value);
      const failed = started.flatMap((r) => (r.status === 'rejected' ? [String(r.reason)] : []));
      if (failed.length > 0) throw new Error(failed.join('\n'));
      for (const instance of instances) clients.push(clientOf(instance, BOOTSTRAP_KEY, answers));
      store = openStore(databaseUrl);
      organisationIds = (await store.db.selectFrom('organisations').select('id').execute()).map((row) => row.id);
      organisationId = organisationIds[0] ?? '';
      // Bootstrap: the organisation and its admin key, one audit row each (src/services/organisations.ts).
      writes = 2;
    });

    afterAll(async () => {
      await Promise.allSettled(instances.map((instance) => stopInstance(instance)));
      await store?.close();
      if (databaseUrl) await dropTestDatabase(databaseUrl);
    });

    beforeEach(({ onTestFailed }) => onTestFailed(() => reportFailure(instances, answers)));

    /** A 201 on a write, or fail with the answer. */
    async function created(answer: Promise<Answer>): Promise<any> {
      const a = await answer;
      expect(a.status, `${a.instance} ${a.method} ${a.path}: ${a.text.slice(0, 300)}`).toBe(201);
      writes++;
      return a.json;
    }

    function expectNo5xx(batch: readonly Answer[]): void {
      const bad = batch.filter((a) => a.status >= 500);
      expect(bad.map((a) => `${a.instance} ${a.method} ${a.path} → ${a.status}: ${a.text.slice(0, 300)}`)).toEqual([]);
    }

    // synthetic: an invented building in an invented temperate climate (two years of daily weather).
    const random = seededRandom(23);
    const weather = dailyWeather(CLIMATES.temperate, '2023-01-01', 731, random);
    let stationId: string | undefined;

    /** One station with its weather for every meter of the test, made on first use. */
    async function sharedStation(): Promise<string> {
      if (stationId) return stationId;
      const station = await created(
        via(0)('POST', '/v1/weather-stations', { name: 'Invented ridge station', temperatureUnit: 'F' }),
      );
      const observed = await via(1)('PUT', `/v1/weather-stations/${station.id}/observations`, {
        observations: weather.map((d) => ({ date: d.date, temp: d.temp })),
      });
      expect(observed.status, observed.text.slice(0, 300)).toBe(200);
      writes++;
      stationId = station.id as string;
      return stationId;
    }

    async function newMeter(facilityId: string, name: string): Promise<string> {
      const body = { name, fuel: 'electricity', unit: 'kWh', weatherStationId: await sharedStation() };
      const meter = await created(via(writes)('POST', `/v1/facilities/${facilityId}/meters`, body));
      return meter.id;
    }

    it('starts both on one new schema with one bootstrap organisation, whose key both accept', async () => {
      expect(organisationIds).toHaveLength(1); // one bootstrap organisation, not one per instance
      const seen = await Promise.all(clients.map((client) => client('GET', '/v1/facilities')));
      // synthetic: nothing made yet, and the shared key works on both.
      expect(seen.map((a) => [a.status, a.json.facilities.length])).toEqual([
        [200, 0],
        [200, 0],
      ]);
    });

    it('lets exactly one of many mutually overlapping reading batches in, whichever instance it reaches', async () => {
      const facility = await created(via(0)('POST', '/v1/facilities', { name: 'Race hall A (invented)' }));
      for (let round = 0; round < ROUNDS; round++) {
        const meterId = await newMeter(facility.id, `Overlap meter ${round}`);
        // synthetic: batch i is three 30-day readings starting i days after 2020-01-01; any two
        // batches overlap (their spans differ by < 20 days) and share no (start, end), so only one fits.
        const batches = Array.from({ length: 20 }, (_, i) =>
          [0, 30, 60].map((offset, k) => {
            const start = addDays('2020-01-01', i + offset);
            return { start, end: addDays(start, 30), quantity: 1000 + 10 * i + k };
          }),
        );
        const results = await Promise.all(
          batches.map((readings, i) => via(i)('POST', `/v1/meters/${meterId}/readings`, { readings })),
        );
        expectNo5xx(results);
        const winners = results.flatMap((a, i) => (a.status === 201 ? [i] : []));
        expect(winners).toHaveLength(1); // the API contract: one batch wins, the rest overlap it
        const losers = results.filter((a) => a.status !== 201);
        expect(losers.map((a) => a.status)).toEqual(Array(19).fill(409)); // the API contract: overlap is a conflict
        for (const loser of losers) expect(loser.json.type).toBe('urn:mvledger:problem:conflict'); // src/http/problem.ts
        writes++;

        const stored = await via(round + 1)('GET', `/v1/meters/${meterId}/readings`);
        expect(stored.status).toBe(200);
        const winner = batches[winners[0]!]!;
        expect(stored.json.readings.map((r: any) => ({ start: r.start, end: r.end, quantity: r.quantity }))).toEqual(
          winner,
        ); // synthetic: exactly the winning batch
      }
    });

    it('stores every one of many disjoint batches sent to both instances at once, each reading once', async () => {
      const facility = await created(via(1)('POST', '/v1/facilities', { name: 'Race hall B (invented)' }));
      const meterId = await newMeter(facility.id, 'Disjoint meter');
      // synthetic: 40 batches of 50 daily readings, batch b covering days 50b..50b+49 after 2001-01-01.
      const batches = Array.from({ length: 40 }, (_, b) =>
        Array.from({ length: 50 }, (_, d) => {
          const day = 50 * b + d;
          const start = addDays('2001-01-01', day);
          return { start, end: addDays(start, 1), quantity: 100 + ((day * 37) % 97) };
        }),
      );
      const sent = batches.flat();
      const sentTotal = sent.reduce((sum, r) => sum + r.quantity, 0);

      const results = await Promise.all(
        batches.map((readings, b) => via(b)('POST', `/v1/meters/${meterId}/readings`, { readings })),
      );
      expectNo5xx(results);
      expect(results.map((a) => a.status)).toEqual(Array(40).fill(201)); // synthetic: disjoint batches never conflict
      expect(results.map((a) => a.json.created)).toEqual(Array(40).fill(50));
      writes += results.length;

      const stored = await via(0)('GET', `/v1/meters/${meterId}/readings?limit=10000`);
      expect(stored.json.readings).toHaveLength(sent.length); // 2000: nothing lost
      expect(new Set(stored.json.readings.map((r: any) => r.start)).size).toBe(sent.length); // nothing doubled
      expect(stored.json.readings.reduce((sum: number, r: any) => sum + r.quantity, 0)).toBe(sentTotal); // synthetic: the sum sent
      // The same seen in the table itself, not only through the API.
      const row = await store!.db
        .selectFrom('readings')
        .select((eb) => [eb.fn.countAll<string>().as('count'), eb.fn.sum<string>('quantity').as('total')])
        .where('meter_id', '=', meterId)
        .executeTakeFirstOrThrow();
      expect(Number(row.count)).toBe(sent.length);
      expect(Number(row.total)).toBe(sentTotal);
    });

    it('freezes exactly one of two drafts frozen at once through different instances', async () => {
      const facility = await created(via(0)('POST', '/v1/facilities', { name: 'Race hall C (invented)' }));

      for (let round = 0; round < ROUNDS; round++) {
        const meterId = await newMeter(facility.id, `Freeze meter ${round}`);
        // synthetic: 24 monthly bills of the invented building.
        const bills = monthlyReadings(SAMPLE_BUILDING, weather, '2023-01-01', 24, random).map((r) => ({
          start: r.start,
          end: r.end,
          quantity: r.quantity,
        }));
        await created(via(round)('POST', `/v1/meters/${meterId}/readings`, { readings: bills }));
        // The two drafts are fitted at once too: their versions must still come out 1 and 2.
        const window = { start: '2023-01-01', end: '2025-01-01' };
        const drafts = await Promise.all(
          [0, 1].map((i) => created(via(i)('POST', `/v1/meters/${meterId}/baselines`, window))),
        );
        expect(drafts.map((d) => d.version).sort()).toEqual([1, 2]); // synthetic: two drafts of a new meter

        // Which instance sends first alternates by round, so either may win.
        const results = await Promise.all(
          drafts.map((draft, i) =>
            via(i + round)('POST', `/v1/baselines/${draft.id}/freeze`, { note: 'agreed at the race-test meeting' }),
          ),
        );
        expectNo5xx(results);
        expect(results.map((a) => a.status).sort()).toEqual([200, 409]); // the API contract: the second needs a supersedeReason
        const refused = results.find((a) => a.status === 409)!;
        expect(refused.json.detail).toContain('supersedeReason');
        writes++;

        const listed = await via(round)('GET', `/v1/meters/${meterId}/baselines`);
        const statuses = listed.json.baselines.map((b: any) => b.status).sort();
        expect(statuses).toEqual(['draft', 'frozen']); // the API contract: one frozen baseline per meter
        const frozenId = drafts[results.findIndex((a) => a.status === 200)]!.id;
        expect(listed.json.baselines.find((b: any) => b.status === 'frozen').id).toBe(frozenId);
      }
    });

    it('creates one facility for one Idempotency-Key sent to both instances at once', async () => {
      for (let round = 0; round < ROUNDS; round++) {
        const name = `Idempotent hall ${round} (invented)`;
        const key = `race-key-${round}`;
        const results = await Promise.all(
          Array.from({ length: 6 }, (_, i) =>
            via(i + round)('POST', '/v1/facilities', { name }, { 'idempotency-key': key }),
          ),
        );
        expectNo5xx(results);
        const listed = await via(round)('GET', '/v1/facilities');
        const made = listed.json.facilities.filter((f: any) => f.name === name);
        expect(made).toHaveLength(1); // one key, one facility
        writes++;

        // Each answer is the first response (201, fresh or replayed) or "still in progress" (409).
        const firsts = results.filter((a) => a.status === 201);
        const fresh = firsts.filter((a) => a.headers.get('idempotent-replayed') !== 'true');
        expect(fresh).toHaveLength(1); // the one request that did the work
        for (const answer of firsts) expect(answer.json.id).toBe(made[0].id);
        for (const answer of results.filter((a) => a.status !== 201)) {
          expect(answer.status).toBe(409); // src/http/plugins/idempotency.ts: the first has not finished
          expect(answer.json.type).toBe('urn:mvledger:problem:idempotency-in-flight');
        }
      }
    });

    it('leaves one unbroken audit chain with exactly one row per successful write', async () => {
      expectNo5xx(answers);
      const verdict = await verifyAuditChain(store!.db, organisationId);
      expect(verdict.broken).toBeUndefined();
      expect(verdict.ok).toBe(true);
      expect(verdict.checked).toBe(writes); // counted by this test: synthetic
      expect(verdict.headSeq).toBe(writes);
      const rows = await store!.db
        .selectFrom('audit_log')
        .select((eb) => eb.fn.countAll<string>().as('count'))
        .executeTakeFirstOrThrow();
      expect(Number(rows.count)).toBe(writes); // no row of another organisation, none stray
      const all = await verifyAllAuditChains(store!.db);
      expect(all).toMatchObject({ ok: true, chains: 1, checked: writes });
    });

    it('opens the same new schema from two connection pools at once', async () => {
      // The schema-creating first query, raced without process start-up jitter: before the fix in
      // src/store/postgres-pool.ts one of the two failed with a unique violation about 4 times in 10.
      for (let trial = 0; trial < 8; trial++) {
        const url = freshTestDatabaseUrl();
        const pools = [openStore(url), openStore(url)];
        try {
          const outcomes = await Promise.allSettled(pools.map((pool) => sql`select 1 as one`.execute(pool.db)));
          expect(outcomes.map((o) => (o.status === 'fulfilled' ? 'ok' : String(o.reason)))).toEqual(['ok', 'ok']);
        } finally {
          await Promise.all(pools.map((pool) => pool.close()));
          await dropTestDatabase(url);
        }
      }
    });
  },
);
