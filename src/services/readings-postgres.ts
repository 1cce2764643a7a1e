/**
 * A batch of readings on PostgreSQL, by set operations: the batch travels as
 * a handful of arrays (one per column) and is unnested in SQL, so a batch of
 * any size costs three statements, not one per reading or per few hundred.
 *
 * 1. One statement finds, for every reading of the batch at once, the stored
 *    readings it meets (same natural key, or overlapping) and the frozen or
 *    superseded baseline windows it touches; only those pairs come back.
 * 2. One INSERT … SELECT FROM unnest(…) writes the new readings.
 * 3. One UPDATE … FROM unnest(…) writes the corrections.
 *
 * Chosen by measurement: a throwaway probe on this machine (batches of
 * 2,500 into a keyed table, 50,000 rows, three rounds; COPY through the
 * pg-copy-streams package, which the project does not depend on) gave
 * unnest 36,000–48,000 rows/s, COPY 34,000–55,000 and the multi-row VALUES
 * insert 10,000–16,000: unnest and COPY alike, both three to four times
 * VALUES. unnest needs no extra package and runs on the transaction's own
 * connection through kysely. The service benchmark keeps the unnest path
 * alone as a reference beside the API (test/bench/service.ts).
 */
import { sql } from 'kysely';
import type { BaselineStatus, ReadingRow } from '../store/schema.js';
import type { Tx } from './context.js';
import type { FrozenWindow } from './frozen-windows.js';

/** What the batch meets in the database, by the batch's own index. */
export interface BatchContacts {
  /** Stored readings meeting each reading of the batch (same key or overlapping), in start order. */
  stored: Map<number, ReadingRow[]>;
  /** Protected baseline windows each reading of the batch touches. */
  frozen: Map<number, FrozenWindow[]>;
}

interface ContactRow {
  kind: 'stored' | 'frozen';
  i: string;
  period_start: string;
  period_end: string;
  quantity: number | null;
  estimated: number | null;
  cost: number | null;
  created_at: string | null;
  updated_at: string | null;
  baseline_id: string | null;
  status: BaselineStatus | null;
}

/**
 * Stored readings and protected windows that the batch's periods meet, in
 * one statement. Stored periods never overlap one another, so those meeting
 * [s, e) start at or after the last one starting on or before s, and before
 * e: two probes of the primary key per reading, whatever the meter holds;
 * and none meets the batch at all when the last one starting before the
 * batch's last end ends by its first start, which one probe decides first.
 */
export async function batchContacts(
  trx: Tx,
  meterId: string,
  periods: readonly { start: string; end: string }[],
  protecting: readonly BaselineStatus[],
): Promise<BatchContacts> {
  const starts = periods.map((p) => p.start);
  const ends = periods.map((p) => p.end);
  const { rows } = await sql<ContactRow>`
    with batch as (select * from unnest(${starts}::text[], ${ends}::text[]) with ordinality as b(s, e, i)),
    span as (select min(s) as lo, max(e) as hi from batch),
    latest as (
      select r.period_end from readings r, span
      where r.meter_id = ${meterId} and r.period_start < span.hi
      order by r.period_start desc limit 1)
    select 'stored' as kind, batch.i, r.period_start, r.period_end, r.quantity, r.estimated, r.cost, r.created_at, r.updated_at,
           null as baseline_id, null as status
    from batch
    join lateral (
      select * from readings r
      where r.meter_id = ${meterId}
        and r.period_start < batch.e
        and r.period_start >= coalesce(
          (select p.period_start from readings p where p.meter_id = ${meterId} and p.period_start <= batch.s order by p.period_start desc limit 1),
          batch.s)
    ) r on r.period_end > batch.s
    -- Stored readings never overlap, so when the last one starting before the batch's end ends by its start, none
    -- meets the batch (the usual case: new bills after the last): one probe instead of two per reading.
    where exists (select 1 from latest, span where latest.period_end > span.lo)
    union all
    select 'frozen', batch.i, w.period_start, w.period_end, null, null, null, null, null, w.id, w.status
    from batch
    join baselines w on w.meter_id = ${meterId} and w.status in (${sql.join(protecting)})
      and w.period_start < batch.e and batch.s < w.period_end
    order by 2, 1, 3`.execute(trx);
  const contacts: BatchContacts = { stored: new Map(), frozen: new Map() };
  for (const row of rows) {
    const index = Number(row.i) - 1; // ordinality counts from 1
    if (row.kind === 'stored') {
      const list = contacts.stored.get(index) ?? [];
      list.push({
        meter_id: meterId,
        period_start: row.period_start,
        period_end: row.period_end,
        quantity: row.quantity!,
        estimated: row.estimated!,
        cost: row.cost,
        created_at: row.created_at!,
        updated_at: row.updated_at!,
      });
      contacts.stored.set(index, list);
    } else {
      const list = contacts.frozen.get(index) ?? [];
      list.push({
        baselineId: row.baseline_id!,
        meterId,
        status: row.status!,
        start: row.period_start,
        end: row.period_end,
      });
      contacts.frozen.set(index, list);
    }
  }
  return contacts;
}

export interface BulkReading {
  start: string;
  end: string;
  quantity: number;
  estimated: number;
  cost: number | null;
}

function columns(readings: readonly BulkReading[]) {
  return {
    s: readings.map((r) => r.start),
    e: readings.map((r) => r.end),
    q: readings.map((r) => r.quantity),
    est: readings.map((r) => r.estimated),
    cost: readings.map((r) => r.cost),
  };
}

/** Insert new readings in one statement. */
export async function insertReadings(
  trx: Tx,
  meterId: string,
  readings: readonly BulkReading[],
  now: string,
): Promise<void> {
  if (readings.length === 0) return;
  const c = columns(readings);
  await sql`
    insert into readings (meter_id, period_start, period_end, quantity, estimated, cost, created_at, updated_at)
    select ${meterId}, s, e, q, est, cost, ${now}, ${now}
    from unnest(${c.s}::text[], ${c.e}::text[], ${c.q}::float8[], ${c.est}::int[], ${c.cost}::float8[]) as t(s, e, q, est, cost)`.execute(
    trx,
  );
}

/** Write corrected values of stored readings (matched on the natural key) in one statement. */
export async function correctReadings(
  trx: Tx,
  meterId: string,
  readings: readonly BulkReading[],
  now: string,
): Promise<void> {
  if (readings.length === 0) return;
  const c = columns(readings);
  await sql`
    update readings r set quantity = t.q, estimated = t.est, cost = t.cost, updated_at = ${now}
    from unnest(${c.s}::text[], ${c.e}::text[], ${c.q}::float8[], ${c.est}::int[], ${c.cost}::float8[]) as t(s, e, q, est, cost)
    where r.meter_id = ${meterId} and r.period_start = t.s and r.period_end = t.e`.execute(trx);
}
