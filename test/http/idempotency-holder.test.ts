/**
 * A key left in flight by a process that died is taken over by the retry at
 * once (src/http/plugins/idempotency.ts with its holder), not refused for a
 * minute; a key held by a live process, or by one on another host, is still
 * refused as in flight; and a service start frees the keys a dead process of
 * its host left (store/idempotency-keys.ts releaseKeysOfGoneHolders). The
 * in-flight rows are made by answering a request and then turning its row
 * back to in flight under the holder the test names. Check values: the API
 * contract; synthetic holders (the test sets the truth).
 */
import { spawnSync } from 'node:child_process';
import { hostname } from 'node:os';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { formatHolder, holderIsGone } from '../../src/lib/process-holder.js';
import { releaseKeysOfGoneHolders } from '../../src/store/idempotency-keys.js';
import { makeTestApi, type TestApi } from '../support/api.js';

let api: TestApi;
beforeEach(async () => (api = await makeTestApi()));
afterEach(async () => api.close());

const deadHolder = () =>
  formatHolder({
    host: hostname(),
    pid: spawnSync(process.execPath, ['-e', ''], { stdio: 'ignore' }).pid!,
    startedAt: Date.now() - 1_000,
  });
const liveHolder = () => formatHolder({ host: hostname(), pid: process.ppid, startedAt: Date.now() });
const farHolder = () => formatHolder({ host: 'another-host', pid: 12345, startedAt: Date.now() });

/** Answers a create with the key, then puts its row back in flight under `holder`, as if that process had died before answering. */
async function leftInFlight(key: string, holder: string) {
  const headers = { 'idempotency-key': key };
  const first = await api.call('POST', '/v1/facilities', { body: { name: `Hall ${key} (invented)` }, headers });
  expect(first.status).toBe(201); // the API contract
  await api.store.db
    .updateTable('idempotency_keys')
    .set({ status_code: null, response_body: null, content_type: null, holder })
    .where('key', '=', key)
    .execute();
  return () => api.call('POST', '/v1/facilities', { body: { name: `Hall ${key} (invented)` }, headers });
}

describe('a key in flight under a holder', () => {
  it('is taken over at once by a retry when its holder died, and then replays', async () => {
    const retry = await leftInFlight('dead-holder-1', deadHolder());
    const taken = await retry();
    expect(taken.status).toBe(201); // served, not 409 in flight
    expect(taken.headers['idempotent-replayed']).toBeUndefined();
    const replay = await retry();
    expect([replay.status, replay.headers['idempotent-replayed']]).toEqual([201, 'true']);
    expect(replay.json).toEqual(taken.json);
  });

  it('is refused as in flight while its holder lives, or runs on another host', async () => {
    for (const [key, holder] of [
      ['live-holder-1', liveHolder()],
      ['far-holder-1', farHolder()],
    ] as const) {
      const retry = await leftInFlight(key, holder);
      const answer = await retry();
      expect(answer.status).toBe(409); // the API contract: idempotency-in-flight
      expect(answer.json.type).toMatch(/idempotency-in-flight/);
    }
  });

  it('is freed at a service start only when its holder is a dead process of this host', async () => {
    await leftInFlight('start-dead', deadHolder());
    await leftInFlight('start-live', liveHolder());
    await leftInFlight('start-far', farHolder());
    expect(await releaseKeysOfGoneHolders(api.store.db, holderIsGone)).toBe(1);
    const left = await api.store.db
      .selectFrom('idempotency_keys')
      .select('key')
      .where('status_code', 'is', null)
      .orderBy('key')
      .execute();
    expect(left.map((row) => row.key)).toEqual(['start-far', 'start-live']);
  });
});
