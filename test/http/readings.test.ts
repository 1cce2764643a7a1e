import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { makeTestApi, type TestApi } from '../support/api.js';
import { databaseDigest } from '../support/db-digest.js';
import { createFacility } from '../../src/services/facilities.js';
import { createMeter } from '../../src/services/meters.js';
import { parseApiKey } from '../../src/store/api-keys.js';
import { verifyAllAuditChains } from '../../src/store/audit.js';
import type { BaselineStatus } from '../../src/store/schema.js';
import { insertBareBaseline } from '../support/baseline-rows.js';

// Check values: synthetic (the test sets the truth) unless a comment beside one names another source.
// Every name and scenario here is invented.

let api: TestApi;
let meterId: string;
let url: string;

async function makeMeter(target: TestApi): Promise<string> {
  const ctx = {
    store: target.store,
    principal: {
      keyId: parseApiKey(target.keys.admin)!.id,
      organisationId: target.organisationId,
      role: 'admin' as const,
    },
    now: '2026-01-01T00:00:00.000Z',
  };
  const station = await target.call('POST', '/v1/weather-stations', {
    body: { name: 'Station S1 (invented)', temperatureUnit: 'F' },
  });
  const facility = await createFacility(ctx, { name: 'Depot D1 (invented)' });
  const meter = await createMeter(ctx, facility.id, {
    name: 'Main supply',
    fuel: 'electricity',
    unit: 'kWh',
    weatherStationId: station.json.id,
  });
  return meter.id;
}

async function insertBaseline(
  target: TestApi,
  meter: string,
  id: string,
  start: string,
  end: string,
  status: BaselineStatus,
): Promise<void> {
  // Written straight to the table: the baselines API is not what is under test here.
  await insertBareBaseline(target.store.db, {
    id,
    organisationId: target.organisationId,
    meterId: meter,
    start,
    end,
    status,
  });
}

const BILLS = [
  { start: '2025-01-01', end: '2025-02-01', quantity: 31000 },
  { start: '2025-02-01', end: '2025-03-01', quantity: 27500, estimated: true },
  { start: '2025-03-01', end: '2025-04-01', quantity: 26000, cost: 4160.5 },
];

async function auditRows(action: string) {
  return api.store.db.selectFrom('audit_log').selectAll().where('action', '=', action).orderBy('seq').execute();
}

/** Send a request that must be refused, and prove it stored nothing. */
async function refused(method: 'POST' | 'GET', path: string, options: Parameters<TestApi['call']>[2]) {
  const before = await databaseDigest(api.store.db);
  const response = await api.call(method, path, options);
  expect(await databaseDigest(api.store.db)).toBe(before);
  return response;
}

beforeEach(async () => {
  api = await makeTestApi();
  meterId = await makeMeter(api);
  url = `/v1/meters/${meterId}/readings`;
});

afterEach(async () => {
  // Whatever a test did, the audit chain must still verify.
  expect((await verifyAllAuditChains(api.store.db)).ok).toBe(true);
  await api.close();
});

describe('POST /v1/meters/{id}/readings', () => {
  it('stores a JSON batch and returns it by start with days', async () => {
    const posted = await api.call('POST', url, { body: { readings: [BILLS[2], BILLS[0], BILLS[1]] } });
    expect(posted.status).toBe(201);
    expect(posted.json).toEqual({ meterId, received: 3, created: 3, corrected: 0, unchanged: 0 }); // synthetic: the test sets the truth

    const listed = await api.call('GET', url, { as: 'analyst' });
    expect(listed.status).toBe(200);
    expect(listed.json).toEqual({
      meterId,
      unit: 'kWh',
      readings: [
        // days hand-worked from the calendar: January 31, February 2025 28, March 31; id: the period (the API's rule).
        {
          id: '2025-01-01..2025-02-01',
          start: '2025-01-01',
          end: '2025-02-01',
          days: 31,
          quantity: 31000,
          estimated: false,
          cost: null,
        },
        {
          id: '2025-02-01..2025-03-01',
          start: '2025-02-01',
          end: '2025-03-01',
          days: 28,
          quantity: 27500,
          estimated: true,
          cost: null,
        },
        {
          id: '2025-03-01..2025-04-01',
          start: '2025-03-01',
          end: '2025-04-01',
          days: 31,
          quantity: 26000,
          estimated: false,
          cost: 4160.5,
        },
      ],
      limit: 1000, // the stated default page size
      nextCursor: null, // one page holds them all
    });
  });

  it('stores a CSV batch with optional columns', async () => {
    const csv =
      'start,end,quantity,estimated,cost\n2025-01-01,2025-02-01,31000,no,\n2025-02-01,2025-03-01,27500,yes,3980.25\n';
    const posted = await api.call('POST', url, { csv });
    expect(posted.status).toBe(201);
    expect(posted.json.created).toBe(2); // synthetic: two rows sent
    const listed = await api.call('GET', url);
    expect(listed.json.readings.map((r: { estimated: boolean; cost: number | null }) => [r.estimated, r.cost])).toEqual(
      [
        [false, null], // synthetic: "no" and an empty cost cell
        [true, 3980.25], // synthetic: "yes" and the cost sent
      ],
    );
  });

  it('counts an identical re-post as unchanged, answers 200 and stores nothing', async () => {
    expect((await api.call('POST', url, { body: { readings: BILLS } })).status).toBe(201);
    const replay = await refused('POST', url, { body: { readings: BILLS } });
    expect(replay.status).toBe(200);
    expect(replay.json).toEqual({ meterId, received: 3, created: 0, corrected: 0, unchanged: 3 }); // synthetic: the same three bills
  });

  it('refuses a changed reading without a reason, and corrects it with one (audited before and after)', async () => {
    await api.call('POST', url, { body: { readings: BILLS } });
    const changed = [{ ...BILLS[0]!, quantity: 31250 }];
    const conflict = await refused('POST', url, { body: { readings: changed } });
    expect(conflict.status).toBe(409);
    expect(conflict.headers['content-type']).toMatch(/^application\/problem\+json/);
    expect(conflict.json.detail).toContain('readings[0].quantity');
    expect(conflict.json.detail).toContain('correctionReason');

    const corrected = await api.call('POST', url, {
      body: { readings: [...changed, BILLS[1]], correctionReason: 'meter re-read on site' },
    });
    expect(corrected.status).toBe(201);
    expect(corrected.json).toEqual({ meterId, received: 2, created: 0, corrected: 1, unchanged: 1 }); // synthetic: one changed, one identical

    const rows = await auditRows('post-readings');
    expect(rows).toHaveLength(2); // synthetic: one row per batch that wrote something
    const last = rows[1]!;
    expect(last.entity_type).toBe('meter');
    expect(last.entity_id).toBe(meterId);
    expect(JSON.parse(last.after_json!)).toMatchObject({
      correctionReason: 'meter re-read on site',
      created: [],
      corrected: [
        {
          start: '2025-01-01',
          end: '2025-02-01',
          before: { quantity: 31000, estimated: 0, cost: null },
          after: { quantity: 31250, estimated: 0, cost: null },
        },
      ],
    });
    const listed = await api.call('GET', url);
    expect(listed.json.readings[0].quantity).toBe(31250); // synthetic: the corrected value
  });

  it("correcting a bill's quantity without resending its cost no longer erases the stored cost", async () => {
    await api.call('POST', url, { body: { readings: BILLS } });
    // BILLS[2] carries cost 4160.5 and BILLS[1] the estimated flag; the corrections send neither.
    const corrected = await api.call('POST', url, {
      body: {
        readings: [
          { start: '2025-03-01', end: '2025-04-01', quantity: 26100 },
          { start: '2025-02-01', end: '2025-03-01', quantity: 27400 },
        ],
        correctionReason: 'meter re-read on site',
      },
    });
    expect(corrected.status).toBe(201);
    expect(corrected.json.corrected).toBe(2); // synthetic: both quantities changed
    const listed = (await api.call('GET', url)).json.readings;
    expect(listed[2]).toMatchObject({ quantity: 26100, cost: 4160.5 }); // synthetic: the cost not sent is kept
    expect(listed[1]).toMatchObject({ quantity: 27400, estimated: true }); // synthetic: the flag not sent is kept
    const row = (await auditRows('post-readings'))[1]!;
    expect(JSON.parse(row.after_json!).corrected[0]).toMatchObject({
      before: { quantity: 26000, cost: 4160.5 },
      after: { quantity: 26100, cost: 4160.5 },
    });

    // The same via CSV with the cost cell left empty; an explicit null in JSON is what clears a cost.
    const csv = 'start,end,quantity,cost\n2025-03-01,2025-04-01,26200,\n';
    expect((await api.call('POST', `${url}?correctionReason=re-read`, { csv })).status).toBe(201);
    expect((await api.call('GET', url)).json.readings[2]).toMatchObject({ quantity: 26200, cost: 4160.5 }); // synthetic: kept
    const cleared = await api.call('POST', url, {
      body: {
        readings: [{ start: '2025-03-01', end: '2025-04-01', quantity: 26200, cost: null }],
        correctionReason: 'cost was billed twice',
      },
    });
    expect(cleared.json.corrected).toBe(1); // synthetic: only the cost changed
    expect((await api.call('GET', url)).json.readings[2].cost).toBeNull(); // synthetic: cleared on request
  });

  it('GET /v1/audit?entity=reading returned nothing: readings filed under their meter are found by the name users see', async () => {
    await api.call('POST', url, { body: { readings: BILLS } });
    for (const entity of ['reading', 'readings']) {
      const found = await api.call('GET', `/v1/audit?entity=${entity}&entityId=${meterId}`, { as: 'analyst' });
      expect(found.status).toBe(200);
      expect(found.json.entries.map((e: { action: string }) => e.action)).toEqual(['post-readings']); // synthetic: one batch posted
      // Batch rows carry named fields, not bare arrays.
      expect(found.json.entries[0].after.created[2]).toEqual({
        start: '2025-03-01',
        end: '2025-04-01',
        quantity: 26000,
        estimated: false,
        cost: 4160.5,
      }); // synthetic: BILLS[2]
    }
    // The meter's own rows still include its creation; reading rows are not the meter's creation.
    const meterRows = await api.call('GET', `/v1/audit?entity=meter&entityId=${meterId}`);
    expect(meterRows.json.entries.map((e: { action: string }) => e.action)).toEqual(['create', 'post-readings']); // synthetic
  });

  it('the integration role could not list meters or read back the readings it posted: it can now, and nothing more', async () => {
    expect((await api.call('POST', url, { as: 'integration', body: { readings: BILLS } })).status).toBe(201);
    const meters = await api.call('GET', '/v1/meters', { as: 'integration' });
    expect(meters.status).toBe(200);
    expect(meters.json.meters.map((m: { id: string }) => m.id)).toEqual([meterId]); // synthetic: the one meter made here
    expect((await api.call('GET', `/v1/meters/${meterId}`, { as: 'integration' })).json.unit).toBe('kWh');
    const readBack = await api.call('GET', url, { as: 'integration' });
    expect(readBack.status).toBe(200);
    expect(readBack.json.readings.map((r: { quantity: number }) => r.quantity)).toEqual([31000, 27500, 26000]); // synthetic: BILLS
    // Nothing more: facilities, stations, baselines, the audit trail stay closed to it.
    for (const path of ['/v1/facilities', '/v1/weather-stations', '/v1/audit', `/v1/meters/${meterId}/baselines`]) {
      expect((await api.call('GET', path, { as: 'integration' })).status, path).toBe(403);
    }
    // Another organisation's key sees none of ours.
    expect((await api.call('GET', '/v1/meters', { as: 'other' })).json.meters).toEqual([]);
  });

  it('takes the correction reason of a CSV batch from the query', async () => {
    await api.call('POST', url, { body: { readings: [BILLS[0]] } });
    const csv = 'start,end,quantity\n2025-01-01,2025-02-01,30990\n';
    expect((await refused('POST', url, { csv })).status).toBe(409);
    const corrected = await api.call(
      'POST',
      `${url}?correctionReason=${encodeURIComponent('estimated bill replaced by actual')}`,
      { csv },
    );
    expect(corrected.status).toBe(201);
    expect(corrected.json.corrected).toBe(1); // synthetic: one reading changed
  });

  it('refuses a new period overlapping stored ones, naming them, and stores none of the batch', async () => {
    await api.call('POST', url, { body: { readings: BILLS } });
    const batch = [
      { start: '2025-04-01', end: '2025-05-01', quantity: 24000 },
      { start: '2025-01-15', end: '2025-02-15', quantity: 30000 },
    ];
    const response = await refused('POST', url, { body: { readings: batch } });
    expect(response.status).toBe(409);
    expect(response.json.detail).toContain('readings[1].start');
    // synthetic: 2025-01-15..2025-02-15 meets the January and February bills.
    expect(response.json.detail).toContain('2025-01-01..2025-02-01, 2025-02-01..2025-03-01');
  });

  it('refuses overlaps and duplicates inside the batch, naming both records', async () => {
    const overlapping = await refused('POST', url, {
      body: { readings: [BILLS[0], { start: '2025-01-20', end: '2025-02-20', quantity: 1 }] },
    });
    expect(overlapping.status).toBe(400);
    expect(overlapping.json.errors[0].field).toBe('readings[1].start');
    expect(overlapping.json.errors[0].message).toContain('readings[0]');

    const duplicated = await refused('POST', url, { body: { readings: [BILLS[0], BILLS[1], BILLS[0]] } });
    expect(duplicated.status).toBe(400);
    expect(duplicated.json.errors[0].field).toBe('readings[2].start');
    expect(duplicated.json.errors[0].message).toMatch(/duplicates.*readings\[0\]/);
  });

  const good = { start: '2025-01-01', end: '2025-02-01', quantity: 100 };
  it.each([
    ['a start that is not a date', { ...good, start: '01/01/2025' }, 'readings[0].start'],
    ['an impossible date', { ...good, end: '2025-02-30' }, 'readings[0].end'],
    ['end equal to start', { ...good, end: '2025-01-01' }, 'readings[0].end'],
    ['end before start', { ...good, end: '2024-12-01' }, 'readings[0].end'],
    ['a negative quantity', { ...good, quantity: -1 }, 'readings[0].quantity'],
    ['NaN sent as a string', { ...good, quantity: 'NaN' }, 'readings[0].quantity'],
    ['a quantity sent as a string', { ...good, quantity: '100' }, 'readings[0].quantity'],
    ['a missing quantity', { start: good.start, end: good.end }, 'readings[0].quantity'],
    ['a negative cost', { ...good, cost: -5 }, 'readings[0].cost'],
    ['a flag that is not a boolean', { ...good, estimated: 'yes' }, 'readings[0].estimated'],
    ['an unknown field', { ...good, tariff: 'A' }, 'readings[0]'],
  ])('refuses %s with a 400 naming the field', async (_what, reading, field) => {
    const response = await refused('POST', url, { body: { readings: [reading] } });
    expect(response.status).toBe(400);
    expect(response.headers['content-type']).toMatch(/^application\/problem\+json/);
    expect(response.json.errors.map((e: { field: string }) => e.field)).toContain(field);
    expect(response.json.detail).toContain(field);
  });

  it('refuses an empty batch and one above 50,000 readings', async () => {
    expect((await refused('POST', url, { body: { readings: [] } })).json.errors[0].field).toBe('readings');
    const tooMany = Array.from({ length: 50_001 }, () => good); // the documented batch limit, plus one
    const response = await refused('POST', url, { body: { readings: tooMany } });
    expect(response.status).toBe(400);
    expect(response.json.errors.map((e: { field: string }) => e.field)).toContain('readings');
  });

  it.each([
    ['an unknown column', 'start,end,quantity,tariff\n2025-01-01,2025-02-01,5,A\n', 'row 1'],
    ['a missing column', 'start,end\n2025-01-01,2025-02-01\n', 'row 1'],
    [
      'an impossible date',
      'start,end,quantity\n2025-01-01,2025-02-01,5\n2025-02-01,2025-02-30,5\n',
      'row 3, field end',
    ],
    [
      'a quantity that is not a number',
      'start,end,quantity\n2025-01-01,2025-02-01,5\n2025-02-01,2025-03-01,12kWh\n',
      'row 3, field quantity',
    ],
    ['NaN', 'start,end,quantity\n2025-01-01,2025-02-01,NaN\n', 'row 2, field quantity'],
    ['a negative quantity', 'start,end,quantity\n2025-01-01,2025-02-01,-3\n', 'row 2, field quantity'],
    ['end before start', 'start,end,quantity\n2025-02-01,2025-01-01,3\n', 'row 2, field end'],
    [
      'an overlap between rows',
      'start,end,quantity\n2025-01-01,2025-02-01,3\n2025-01-10,2025-02-10,3\n',
      'row 3, field start',
    ],
  ])('refuses CSV with %s, naming the row', async (_what, csv, field) => {
    const response = await refused('POST', url, { csv });
    expect(response.status).toBe(400);
    expect(response.json.errors[0].field).toBe(field);
    expect(response.json.detail).toContain(field.split(',')[0]);
  });

  it('names the other CSV row of an overlap by its row', async () => {
    const response = await refused('POST', url, {
      csv: 'start,end,quantity\n2025-01-01,2025-02-01,3\n2025-01-10,2025-02-10,3\n',
    });
    expect(response.json.errors[0].message).toContain('row 2'); // synthetic: the first data row is line 2
  });

  it("answers 404 for another organisation's meter", async () => {
    expect((await refused('POST', url, { as: 'other', body: { readings: BILLS } })).status).toBe(404);
    expect((await api.call('GET', url, { as: 'other' })).status).toBe(404);
    expect((await refused('POST', '/v1/meters/mtr_nonexistent/readings', { body: { readings: BILLS } })).status).toBe(
      404,
    );
  });

  it('lets integration keys post and refuses analysts', async () => {
    expect((await refused('POST', url, { as: 'analyst', body: { readings: BILLS } })).status).toBe(403);
    expect((await refused('POST', url, { as: 'none', body: { readings: BILLS } })).status).toBe(401);
    expect((await api.call('POST', url, { as: 'integration', body: { readings: BILLS } })).status).toBe(201);
    // Roles as src/domain/principal.ts grants them: integration keys lack 'read' but may reconcile (read back readings).
    expect((await api.call('GET', url, { as: 'integration' })).status).toBe(200);
    expect((await api.call('GET', url, { as: 'engineer' })).status).toBe(200);
  });

  it('replays the first response for a repeated Idempotency-Key and stores nothing new', async () => {
    const headers = { 'idempotency-key': 'bill-run-2025-q1' };
    const first = await api.call('POST', url, { body: { readings: BILLS }, headers });
    expect(first.status).toBe(201);
    const replay = await refused('POST', url, { body: { readings: BILLS }, headers });
    expect(replay.status).toBe(201);
    expect(replay.headers['idempotent-replayed']).toBe('true');
    expect(replay.json).toEqual(first.json);
  });
});

describe('frozen baseline windows', () => {
  beforeEach(async () => {
    await insertBaseline(api, meterId, 'bsl_frozen_2024', '2024-01-01', '2025-01-01', 'frozen');
  });

  it('refuses readings inside the window with a 409 naming the baseline and window, storing nothing', async () => {
    const batch = [
      { start: '2025-01-01', end: '2025-02-01', quantity: 5 },
      { start: '2024-06-01', end: '2024-07-01', quantity: 5 },
    ];
    const response = await refused('POST', url, { body: { readings: batch } });
    expect(response.status).toBe(409);
    expect(response.json.type).toBe('urn:mvledger:problem:frozen');
    expect(response.json.detail).toContain('readings[1]');
    expect(response.json.detail).toContain('bsl_frozen_2024');
    expect(response.json.detail).toContain('2024-01-01..2025-01-01');
  });

  it('refuses a period straddling the window end, and accepts one starting on it (end exclusive)', async () => {
    // hand-worked: [2024-12-15, 2025-01-15) meets [2024-01-01, 2025-01-01); [2025-01-01, …) does not.
    expect(
      (await refused('POST', url, { body: { readings: [{ start: '2024-12-15', end: '2025-01-15', quantity: 5 }] } }))
        .status,
    ).toBe(409);
    expect(
      (await api.call('POST', url, { body: { readings: [{ start: '2025-01-01', end: '2025-02-01', quantity: 5 }] } }))
        .status,
    ).toBe(201);
    expect(
      (await api.call('POST', url, { body: { readings: [{ start: '2023-12-01', end: '2024-01-01', quantity: 5 }] } }))
        .status,
    ).toBe(201);
  });

  it('refuses a correction inside the window even with a reason, but allows an identical re-post', async () => {
    const inside = { start: '2024-03-01', end: '2024-04-01', quantity: 900 };
    await api.store.db.deleteFrom('baselines').execute();
    await api.call('POST', url, { body: { readings: [inside] } });
    await insertBaseline(api, meterId, 'bsl_frozen_again', '2024-01-01', '2025-01-01', 'frozen');

    const correction = await refused('POST', url, {
      body: { readings: [{ ...inside, quantity: 950 }], correctionReason: 'late adjustment' },
    });
    expect(correction.status).toBe(409);
    expect(correction.json.detail).toContain('bsl_frozen_again');
    const same = await api.call('POST', url, { body: { readings: [inside] } });
    expect(same.status).toBe(200);
    expect(same.json.unchanged).toBe(1); // synthetic: nothing changed
  });
});

describe('GET /v1/meters/{id}/readings', () => {
  it('returns the readings overlapping [from, to)', async () => {
    await api.call('POST', url, { body: { readings: BILLS } });
    const listed = await api.call('GET', `${url}?from=2025-01-15&to=2025-03-01`);
    expect(listed.status).toBe(200);
    // synthetic: January overlaps from its 15th, February lies inside, March starts on `to`.
    expect(listed.json.readings.map((r: { start: string }) => r.start)).toEqual(['2025-01-01', '2025-02-01']);
  });

  it('refuses a range whose end is not after its start, and a bad date', async () => {
    const backwards = await api.call('GET', `${url}?from=2025-03-01&to=2025-01-01`);
    expect(backwards.status).toBe(400);
    expect(backwards.json.errors[0].field).toBe('query.to');
    const impossible = await api.call('GET', `${url}?from=2025-02-30`);
    expect(impossible.status).toBe(400);
    expect(impossible.json.errors[0].field).toBe('query.from');
  });
});
