/**
 * A write sent with an Idempotency-Key, its process killed (SIGKILL) while
 * the key is in flight, the service restarted on the same database: the
 * retry with the same key is served at once (not refused as in flight for a
 * minute, as before the key carried its holder), the readings are stored
 * exactly once with one audit row, and a second retry replays the answer.
 *
 * The kill is aimed by holding the organisation's write lock from the test
 * once the key is reserved (PostgreSQL: the advisory lock the service takes,
 * held before the request is sent; SQLite: BEGIN IMMEDIATE once the reserved
 * row shows, or the kill at once if the service already writes), so the
 * service is caught between reserving the key and answering. Runs on a
 * temporary SQLite file, or a fresh PostgreSQL schema in the postgres project.
 * Check values: the API contract; synthetic data (the test sets the truth).
 */
import BetterSqlite3 from 'better-sqlite3';
import { sql } from 'kysely';
import { afterAll, describe, expect, it } from 'vitest';
import { openStore, type Store } from '../../src/store/connect.js';
import { verifyAuditChain } from '../../src/store/audit.js';
import { testDialect } from '../support/database.js';
import { describeOutputs, stopInstance, type Instance } from '../multi-instance/support.js';
import {
  auditRows,
  call,
  dailyBatch,
  freshFaultDatabase,
  killHard,
  ok,
  send,
  sleep,
  startService,
  storedIn,
  sumOf,
} from './support.js';

/** Large enough that the request is still being served when the test reacts to its reserved key. */
const BATCH_READINGS = 20_000;
const FIRST_DAY = '1700-01-01';
const KEY = 'restart-batch-1';

describe(`idempotency across a restart on ${testDialect()}: SIGKILL with a key in flight`, () => {
  const database = freshFaultDatabase();
  let instance: Instance | undefined;
  let store: Store | undefined;

  afterAll(async () => {
    if (instance) await stopInstance(instance);
    await store?.close();
    await database.dispose();
  });

  it('serves the retry at once, stores the batch exactly once and replays it after', async ({ onTestFailed }) => {
    onTestFailed(() => console.error(instance ? describeOutputs([instance]) : '(no instance)'));
    instance = await startService(database, 'idempotency-0');
    const station = await ok(
      call(instance.base, 'POST', '/v1/weather-stations', { name: 'Invented restart station', temperatureUnit: 'F' }),
      'station',
    );
    const facility = await ok(
      call(instance.base, 'POST', '/v1/facilities', { name: 'Restart hall (invented)' }),
      'facility',
    );
    const meter = await ok(
      call(instance.base, 'POST', `/v1/facilities/${facility.id}/meters`, {
        name: 'Batch meter',
        fuel: 'electricity',
        unit: 'kWh',
        weatherStationId: station.id,
      }),
      'meter',
    );
    const organisationId = await organisationOf(database.url);
    store = openStore(database.url);
    const readings = dailyBatch(FIRST_DAY, BATCH_READINGS);
    const path = `/v1/meters/${meter.id}/readings`;
    const headers = { 'idempotency-key': KEY };

    const held = await holdWriteLock(store, database.url, organisationId);
    const flight = send(instance.base, 'POST', path, { readings }, undefined, headers);
    await flight.sent;
    const reserved = await reservedKey(store, KEY);
    expect(reserved.status_code).toBeNull(); // in flight when killed
    expect(reserved.holder).toMatch(new RegExp(`/${instance.child.pid}/`)); // held by the service process
    await held.afterReserved();
    await killHard(instance);
    const first = await flight.outcome;
    await held.release();

    instance = await startService(database, 'idempotency-1');
    const retry = await call(instance.base, 'POST', path, { readings }, undefined, headers);
    // Served, not 409 in flight: 201 when the killed write had not committed (the lock makes that the rule;
    // 200 "unchanged" only if SQLite's write got in before the test's lock).
    expect(retry.kind).toBe('answered');
    const status = retry.kind === 'answered' ? retry.status : 0;
    expect([201, 200]).toContain(status); // the API contract
    if (held.blockedTheWrite) expect(status).toBe(201);
    expect(await storedIn(store, meter.id, FIRST_DAY, '9999-01-01')).toEqual({
      count: BATCH_READINGS,
      total: sumOf(readings),
    }); // synthetic: the batch sent
    expect((await auditRows(store, 'post-readings')).filter((row) => row.entity_id === meter.id)).toHaveLength(1); // exactly once

    const replay = await call(instance.base, 'POST', path, { readings }, undefined, headers);
    expect(replay).toMatchObject({ kind: 'answered', status });
    expect(replay.kind === 'answered' && replay.text).toBe(retry.kind === 'answered' && retry.text); // the same answer, replayed
    expect((await auditRows(store, 'post-readings')).filter((row) => row.entity_id === meter.id)).toHaveLength(1);
    expect((await verifyAuditChain(store.db, organisationId)).ok).toBe(true);
    console.log(
      `[faults/idempotency-restart ${testDialect()}] first request ${first.kind === 'cut' ? 'cut by the kill' : `answered ${first.status}`}; ` +
        `write ${held.blockedTheWrite ? 'held back by the test' : 'already running'} at the kill; retry ${status}, replay ${status}`,
    );
  }, 120_000); // two starts of a real process: slow on a loaded machine, never a measure of speed
});

async function organisationOf(url: string): Promise<string> {
  const store = openStore(url);
  try {
    return (await store.db.selectFrom('organisations').select('id').executeTakeFirstOrThrow()).id;
  } finally {
    await store.close();
  }
}

/** The key's row once the service has reserved it (polled). */
async function reservedKey(store: Store, key: string) {
  for (let i = 0; i < 10_000; i++) {
    const row = await store.db.selectFrom('idempotency_keys').selectAll().where('key', '=', key).executeTakeFirst();
    if (row) return row;
    await sleep(2);
  }
  throw new Error(`the key ${key} was never reserved`);
}

interface HeldLock {
  /** Called once the key is reserved: on SQLite, takes the write lock if the service does not hold it. */
  afterReserved(): Promise<void>;
  release(): Promise<void>;
  /** True when the service's write waited for the test's lock (it cannot have committed). */
  blockedTheWrite: boolean;
}

/** The organisation's write lock, held by the test: PostgreSQL's advisory lock at once; SQLite's write lock once the key is reserved. */
async function holdWriteLock(store: Store, url: string, organisationId: string): Promise<HeldLock> {
  if (testDialect() === 'postgres') {
    let unlock: () => void = () => {};
    const unlocked = new Promise<void>((resolve) => (unlock = resolve));
    let locked: () => void = () => {};
    const isLocked = new Promise<void>((resolve) => (locked = resolve));
    const session = store.db.connection().execute(async (connection) => {
      await sql`select pg_advisory_lock(hashtext(${organisationId}))`.execute(connection);
      locked();
      await unlocked;
      await sql`select pg_advisory_unlock(hashtext(${organisationId}))`.execute(connection);
    });
    await isLocked;
    return {
      blockedTheWrite: true,
      afterReserved: async () => {
        await sleep(200); // the write is waiting on the lock: let it get there
      },
      release: async () => {
        unlock();
        await session;
      },
    };
  }
  const file = url.slice('sqlite:'.length);
  const connection = new BetterSqlite3(file, { timeout: 0 });
  const held: HeldLock = {
    blockedTheWrite: false,
    afterReserved: async () => {
      try {
        connection.exec('BEGIN IMMEDIATE');
        held.blockedTheWrite = true;
        await sleep(200); // the service's write is now waiting on the lock
      } catch {
        // SQLITE_BUSY: the service is writing already; the kill comes at once.
      }
    },
    release: async () => {
      if (connection.inTransaction) connection.exec('ROLLBACK');
      connection.close();
    },
  };
  return held;
}
