import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { makeTestApi, type TestApi } from '../support/api.js';
import { databaseDigest } from '../support/db-digest.js';
import { addDays } from '../../src/engine/index.js';
import { DomainError } from '../../src/domain/errors.js';
import type { ServiceContext } from '../../src/services/context.js';
import { createFacility } from '../../src/services/facilities.js';
import { createMeter } from '../../src/services/meters.js';
import { INSERT_CHUNK_ROWS, listReadings, postReadings } from '../../src/services/readings.js';
import {
  assertOutsideFrozenWindows,
  frozenWindowsForMeter,
  frozenWindowsForStation,
  type FrozenWindow,
} from '../../src/services/frozen-windows.js';
import { createStation } from '../../src/services/weather-stations.js';
import { parseApiKey } from '../../src/store/api-keys.js';
import { verifyAllAuditChains } from '../../src/store/audit.js';
import type { BaselineStatus } from '../../src/store/schema.js';
import { insertBareBaseline } from '../support/baseline-rows.js';

// Check values: synthetic (the test sets the truth) unless a comment beside one names another source.
// Every name and scenario here is invented.

let api: TestApi;
let ctx: ServiceContext;
let stationId: string;
let meterId: string;

async function addMeter(station: string, name: string): Promise<string> {
  const facility = await createFacility(ctx, { name: `${name} hall (invented)` });
  return (await createMeter(ctx, facility.id, { name, fuel: 'electricity', unit: 'kWh', weatherStationId: station }))
    .id;
}

async function addBaseline(
  meter: string,
  id: string,
  start: string,
  end: string,
  status: BaselineStatus,
  version = 1,
): Promise<void> {
  await insertBareBaseline(api.store.db, {
    id,
    organisationId: api.organisationId,
    meterId: meter,
    start,
    end,
    status,
    version,
    model: '2P',
    at: ctx.now,
  });
}

/** The DomainError a call rejects with (fails the test if it resolves). */
async function problemOf(work: Promise<unknown>): Promise<DomainError> {
  const outcome = await work.then(
    () => null,
    (error: unknown) => error,
  );
  expect(outcome).toBeInstanceOf(DomainError);
  return outcome as DomainError;
}

beforeEach(async () => {
  api = await makeTestApi();
  ctx = {
    store: api.store,
    principal: { keyId: parseApiKey(api.keys.engineer)!.id, organisationId: api.organisationId, role: 'engineer' },
    now: '2026-02-01T00:00:00.000Z',
  };
  stationId = (await createStation(ctx, { name: 'Roof station R1 (invented)', temperatureUnit: 'F' })).id;
  meterId = await addMeter(stationId, 'Plant room');
});

afterEach(async () => {
  expect((await verifyAllAuditChains(api.store.db)).ok).toBe(true);
  await api.close();
});

describe('postReadings', () => {
  it('inserts a batch larger than one insert statement holds, all in one audit row', async () => {
    const count = INSERT_CHUNK_ROWS * 2 + 1; // synthetic: forces three insert statements
    const readings = Array.from({ length: count }, (_, d) => ({
      start: addDays('2020-01-01', d),
      end: addDays('2020-01-01', d + 1),
      quantity: d,
    }));
    const result = await postReadings(ctx, meterId, { readings });
    expect(result).toEqual({ meterId, received: count, created: count, corrected: 0, unchanged: 0 });
    const stored = await listReadings(api.store.db, api.organisationId, meterId);
    expect(stored.readings).toHaveLength(count);
    expect(stored.readings[count - 1]).toMatchObject({
      start: addDays('2020-01-01', count - 1),
      days: 1,
      quantity: count - 1,
    });
    const audits = await api.store.db
      .selectFrom('audit_log')
      .select('after_json')
      .where('action', '=', 'post-readings')
      .execute();
    expect(audits).toHaveLength(1); // one row per batch, never per reading
    // synthetic: the first reading sent, with named fields
    expect(JSON.parse(audits[0]!.after_json!).created[0]).toEqual({
      start: '2020-01-01',
      end: '2020-01-02',
      quantity: 0,
      estimated: false,
      cost: null,
    });
  });

  it('finds a stored period that starts before the batch and reaches into it', async () => {
    await postReadings(ctx, meterId, { readings: [{ start: '2024-01-01', end: '2024-04-01', quantity: 300 }] });
    const before = await databaseDigest(api.store.db);
    const problem = await problemOf(
      postReadings(ctx, meterId, {
        readings: [
          { start: '2024-03-15', end: '2024-04-15', quantity: 10 },
          { start: '2024-04-15', end: '2024-05-15', quantity: 10 },
        ],
      }),
    );
    expect(problem.kind).toBe('conflict');
    expect(problem.detail).toContain('readings[0].start');
    expect(problem.detail).toContain('2024-01-01..2024-04-01');
    expect(await databaseDigest(api.store.db)).toBe(before);
  });

  it('finds stored periods lying wholly inside a new one', async () => {
    await postReadings(ctx, meterId, {
      readings: [
        { start: '2024-02-01', end: '2024-02-10', quantity: 1 },
        { start: '2024-02-10', end: '2024-02-20', quantity: 1 },
      ],
    });
    const problem = await problemOf(
      postReadings(ctx, meterId, { readings: [{ start: '2024-01-01', end: '2024-03-01', quantity: 10 }] }),
    );
    expect(problem.detail).toContain('2024-02-01..2024-02-10, 2024-02-10..2024-02-20');
  });

  it('accepts periods that only touch stored ones (end exclusive)', async () => {
    await postReadings(ctx, meterId, { readings: [{ start: '2024-02-01', end: '2024-03-01', quantity: 1 }] });
    const result = await postReadings(ctx, meterId, {
      readings: [
        { start: '2024-01-01', end: '2024-02-01', quantity: 1 },
        { start: '2024-03-01', end: '2024-04-01', quantity: 1 },
      ],
    });
    expect(result.created).toBe(2); // hand-worked: [Jan, Feb 1) and [Mar 1, Apr) only share read dates
  });

  it('treats a blank correction reason as none', async () => {
    await postReadings(ctx, meterId, { readings: [{ start: '2024-01-01', end: '2024-02-01', quantity: 1 }] });
    const problem = await problemOf(
      postReadings(ctx, meterId, {
        readings: [{ start: '2024-01-01', end: '2024-02-01', quantity: 2 }],
        correctionReason: '   ',
      }),
    );
    expect(problem.kind).toBe('conflict');
  });

  it('compares estimated and cost as well as quantity', async () => {
    const bill = { start: '2024-01-01', end: '2024-02-01', quantity: 1, estimated: true, cost: 0.2 };
    await postReadings(ctx, meterId, { readings: [bill] });
    expect((await postReadings(ctx, meterId, { readings: [bill] })).unchanged).toBe(1);
    const flag = await problemOf(postReadings(ctx, meterId, { readings: [{ ...bill, estimated: false }] }));
    expect([flag.kind, flag.errors?.[0]?.field]).toEqual(['conflict', 'readings[0].estimated']);
    const cost = await problemOf(postReadings(ctx, meterId, { readings: [{ ...bill, cost: null }] }));
    expect([cost.kind, cost.errors?.[0]?.field]).toEqual(['conflict', 'readings[0].cost']);
  });

  it('refuses a cost that is not finite', async () => {
    const problem = await problemOf(
      postReadings(ctx, meterId, {
        readings: [{ start: '2024-01-01', end: '2024-02-01', quantity: 1, cost: Number.NaN }],
      }),
    );
    expect(problem.kind).toBe('invalid');
    expect(problem.errors?.[0]?.field).toBe('readings[0].cost');
  });
});

describe('frozen windows', () => {
  it('include frozen and superseded baselines of the meter, not drafts or other meters', async () => {
    const otherMeter = await addMeter(stationId, 'Annexe');
    await addBaseline(meterId, 'bsl_old', '2022-01-01', '2023-01-01', 'superseded', 1);
    await addBaseline(meterId, 'bsl_new', '2023-01-01', '2024-01-01', 'frozen', 2);
    await addBaseline(meterId, 'bsl_draft', '2024-01-01', '2025-01-01', 'draft', 3);
    await addBaseline(otherMeter, 'bsl_annexe', '2021-01-01', '2022-01-01', 'frozen', 1);
    expect(
      (await frozenWindowsForMeter(api.store.db, meterId)).map((w) => [w.baselineId, w.status, w.start, w.end]),
    ).toEqual([
      ['bsl_old', 'superseded', '2022-01-01', '2023-01-01'],
      ['bsl_new', 'frozen', '2023-01-01', '2024-01-01'],
    ]);
    expect((await frozenWindowsForStation(api.store.db, stationId)).map((w) => w.baselineId)).toEqual([
      'bsl_annexe',
      'bsl_old',
      'bsl_new',
    ]);
  });

  it('are empty for a station whose meters have no frozen baselines', async () => {
    const quiet = (await createStation(ctx, { name: 'Station R2 (invented)', temperatureUnit: 'C' })).id;
    await addMeter(quiet, 'Kiosk');
    expect(await frozenWindowsForStation(api.store.db, quiet)).toEqual([]);
  });

  it('refuse writes meeting [start, end) and let touching ones through', () => {
    const windows: FrozenWindow[] = [
      { baselineId: 'bsl_a', meterId: 'mtr_a', status: 'frozen', start: '2024-01-01', end: '2025-01-01' },
    ];
    const name = (write: { start: string }) => `write ${write.start}`;
    // hand-worked: periods ending on the window start, or starting on its end, do not meet it.
    expect(() =>
      assertOutsideFrozenWindows(
        windows,
        [
          { start: '2023-12-01', end: '2024-01-01' },
          { start: '2025-01-01', end: '2025-01-02' },
        ],
        name,
      ),
    ).not.toThrow();
    let caught: unknown;
    try {
      assertOutsideFrozenWindows(
        windows,
        [
          { start: '2023-12-15', end: '2024-01-15' },
          { start: '2024-12-31', end: '2025-01-01' },
        ],
        name,
      );
    } catch (error) {
      caught = error;
    }
    const problem = caught as DomainError;
    expect(problem).toBeInstanceOf(DomainError);
    expect(problem.kind).toBe('frozen');
    expect(problem.detail).toContain('write 2023-12-15 (2023-12-15..2024-01-15), write 2024-12-31 (2024-12-31)');
    expect(problem.detail).toContain('bsl_a');
    expect(problem.errors).toHaveLength(2);
    expect(problem.facts).toEqual({ baselines: ['bsl_a'] });
  });

  it('protect a superseded window from new readings', async () => {
    await addBaseline(meterId, 'bsl_history', '2022-01-01', '2023-01-01', 'superseded');
    const problem = await problemOf(
      postReadings(ctx, meterId, { readings: [{ start: '2022-05-01', end: '2022-06-01', quantity: 1 }] }),
    );
    expect(problem.kind).toBe('frozen');
    expect(problem.detail).toContain('superseded baseline bsl_history');
  });

  it('leave a draft window open', async () => {
    await addBaseline(meterId, 'bsl_draft', '2022-01-01', '2023-01-01', 'draft');
    expect(
      (await postReadings(ctx, meterId, { readings: [{ start: '2022-05-01', end: '2022-06-01', quantity: 1 }] }))
        .created,
    ).toBe(1);
  });
});
