/**
 * /v1/audit and /v1/audit/verify. Check values: the API contract, and a
 * clock the test controls (synthetic: the test sets the truth), so every
 * row's time is known.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sql } from 'kysely';
import { makeTestApi, type TestApi } from '../support/api.js';

let api: TestApi;
let clock = Date.parse('2026-03-01T00:00:00.000Z');
const facilityIds: string[] = [];
let stationId: string;

beforeAll(async () => {
  // Each call of the clock moves an hour on: rows fall on known hours.
  api = await makeTestApi({ now: () => new Date((clock += 3_600_000)).toISOString() });
  for (const name of ['North Wing', 'South Wing', 'East Wing']) {
    facilityIds.push((await api.call('POST', '/v1/facilities', { body: { name } })).json.id);
  }
  stationId = (
    await api.call('POST', '/v1/weather-stations', {
      as: 'engineer',
      body: { name: 'Roof Sensor', temperatureUnit: 'C' },
    })
  ).json.id;
  await api.call('POST', '/v1/facilities', { as: 'other', body: { name: 'Not Ours' } });
});
afterAll(async () => api.close());

type Entry = {
  seq: number;
  at: string;
  actor: string;
  entityType: string;
  entityId: string;
  before: unknown;
  after: unknown;
  hash: string;
  prevHash: string;
};

describe('the audit trail', () => {
  it("lists the organisation's rows in sequence order, with before and after as JSON", async () => {
    const response = await api.call('GET', '/v1/audit', { as: 'analyst' });
    expect(response.status).toBe(200);
    const entries: Entry[] = response.json.entries;
    const seqs = entries.map((e) => e.seq);
    expect(seqs).toEqual([...seqs].sort((a, b) => a - b));
    // organisation, 4 keys, 3 facilities, 1 station: 9 rows (synthetic: the setup made them)
    expect(entries.map((e) => e.entityType)).toEqual([
      'organisation',
      'api-key',
      'api-key',
      'api-key',
      'api-key',
      'facility',
      'facility',
      'facility',
      'weather-station',
    ]);
    expect(entries.some((e) => JSON.stringify(e).includes('Not Ours'))).toBe(false);
    const station = entries[8]!;
    expect(station).toMatchObject({
      action: 'create',
      entityId: stationId,
      before: null,
      after: { id: stationId, name: 'Roof Sensor', temperatureUnit: 'C' },
    });
    expect(station.actor).toMatch(/^[A-Za-z0-9]{8}$/); // the engineer key's id
    expect(entries[0]!.actor).toBe('system');
    expect(response.json.next).toBeUndefined();
  });

  it('filters by entity type and id', async () => {
    const facilities = await api.call('GET', '/v1/audit?entity=facility');
    expect(facilities.json.entries.map((e: Entry) => e.entityId)).toEqual(facilityIds);
    const one = await api.call('GET', `/v1/audit?entity=facility&entityId=${facilityIds[1]}`);
    expect(one.json.entries).toHaveLength(1);
    expect(one.json.entries[0].after.name).toBe('South Wing');
  });

  it('filters by since, as a date-time in any offset or as a date', async () => {
    const all: Entry[] = (await api.call('GET', '/v1/audit')).json.entries;
    const third = all.find((e) => e.entityId === facilityIds[2])!;
    const utc = await api.call('GET', `/v1/audit?since=${encodeURIComponent(third.at)}`);
    expect(utc.json.entries.map((e: Entry) => e.entityId)).toEqual([facilityIds[2], stationId]);
    // The same instant written two hours east of UTC (synthetic: the test sets the truth).
    const shifted = new Date(Date.parse(third.at) + 2 * 3_600_000).toISOString().slice(0, 19) + '+02:00';
    const east = await api.call('GET', `/v1/audit?since=${encodeURIComponent(shifted)}`);
    expect(east.json.entries.map((e: Entry) => e.entityId)).toEqual([facilityIds[2], stationId]);
    // A date means its midnight UTC: the last row's date includes it, the day after excludes it.
    const lastAt = all[all.length - 1]!.at;
    const lastDate = lastAt.slice(0, 10);
    const dayAfter = new Date(Date.parse(`${lastDate}T00:00:00Z`) + 86_400_000).toISOString().slice(0, 10);
    const sameDay = await api.call('GET', `/v1/audit?since=${lastDate}`);
    expect(sameDay.json.entries.map((e: Entry) => e.at)).toContain(lastAt);
    expect(sameDay.json.entries.every((e: Entry) => e.at >= `${lastDate}T00:00:00.000Z`)).toBe(true);
    expect((await api.call('GET', `/v1/audit?since=${dayAfter}`)).json.entries).toEqual([]);
  });

  it('pages with limit and after until next is absent', async () => {
    const all: Entry[] = (await api.call('GET', '/v1/audit')).json.entries;
    const seen: number[] = [];
    let url = '/v1/audit?limit=4';
    for (let pages = 0; pages < 10; pages++) {
      const page = await api.call('GET', url);
      seen.push(...page.json.entries.map((e: Entry) => e.seq));
      if (page.json.next === undefined) break;
      url = `/v1/audit?limit=4&after=${page.json.next}`;
    }
    expect(seen).toEqual(all.map((e) => e.seq));
  });

  const invalid = [
    'since=yesterday',
    'since=2026-02-30',
    'since=2026-03-01T10:00:00',
    'limit=0',
    'limit=5000',
    'limit=two',
    'after=-1',
    'entity=Facility!',
    'colour=red',
  ];
  for (const query of invalid) {
    it(`refuses ?${query} with 400 naming the parameter`, async () => {
      const response = await api.call('GET', `/v1/audit?${query}`);
      expect(response.status).toBe(400); // contract: validation problem
      expect(response.json.detail).toMatch(/^query\./);
    });
  }

  it('needs the read permission', async () => {
    expect((await api.call('GET', '/v1/audit', { as: 'integration' })).status).toBe(403); // integration lacks read
    expect((await api.call('GET', '/v1/audit/verify', { as: 'integration' })).status).toBe(403);
  });
});

describe('verifying the chain', () => {
  it('reports an intact chain with its head', async () => {
    const response = await api.call('GET', '/v1/audit/verify', { as: 'analyst' });
    expect(response.status).toBe(200);
    // the organisation's own chain only: another organisation's rows are neither counted nor shown
    const own = api.store.db.selectFrom('audit_log').where('organisation_id', '=', api.organisationId);
    const total = await own.select(sql<number>`count(*)`.as('n')).executeTakeFirstOrThrow();
    const last = await own.select(['seq', 'hash']).orderBy('seq', 'desc').limit(1).executeTakeFirstOrThrow();
    expect(response.json).toEqual({
      ok: true,
      checked: Number(total.n),
      headSeq: last.seq,
      headHash: last.hash,
      baselines: { ok: true, checked: 0, differences: [] }, // no baseline was frozen here
    });
  });

  it('names the first edited row', async () => {
    const all: Entry[] = (await api.call('GET', '/v1/audit?entity=facility')).json.entries;
    const target = all[1]!;
    await api.store.db
      .updateTable('audit_log')
      .set({ after_json: '{"name":"Edited"}' })
      .where('organisation_id', '=', api.organisationId)
      .where('seq', '=', target.seq)
      .execute();
    const response = await api.call('GET', '/v1/audit/verify');
    expect(response.status).toBe(200);
    expect(response.json.ok).toBe(false);
    expect(response.json.broken.seq).toBe(target.seq); // synthetic: the test edited this row
    expect(response.json.headSeq).toBe(target.seq - 1);
  });
});
