/**
 * Meter readings: a batch is checked whole, compared with what is stored
 * under the natural key (meter, start, end), and written in one transaction
 * or not at all. Re-posting the same reading is harmless; changing a stored
 * one needs a stated reason; no period may overlap another; nothing inside a
 * frozen baseline's window may change.
 */
import { beyondBoundPerDay, checkReadings, daysBetween, MAX_COST_PER_DAY, parseIsoDate } from '../engine/index.js';
import type { NewReadingRow, ReadingRow } from '../store/schema.js';
import { DomainError, type FieldError, fieldErrors, MAX_LISTED_ERRORS, summarise } from '../domain/errors.js';
import { MAX_RECORDS_PER_BATCH } from '../domain/limits.js';
import { audit, inTransaction, type Executor, type ServiceContext, type Tx } from './context.js';
import { getMeterRow } from './meters.js';
import {
  assertOutsideFrozenWindows,
  frozenWindowsForMeter,
  PROTECTING_STATUSES,
  type FrozenWindow,
} from './frozen-windows.js';
import { batchContacts, correctReadings, insertReadings } from './readings-postgres.js';
import { bumpMeterVersions } from '../store/data-versions.js';
import { decodeCursor, PAGE_SIZES, pageOf, type PageInfo, type PageRequest } from './paging.js';
import { spanOf } from './meter-data.js';

/**
 * Rows per insert statement (8 parameters each, far below SQLite's 32,766):
 * a few hundred measured fastest, as preparing very long statements costs more.
 */
export const INSERT_CHUNK_ROWS = 400;

export interface ReadingInput {
  start: string;
  end: string;
  quantity: number;
  estimated?: boolean;
  cost?: number | null;
}

export interface PostReadingsInput {
  readings: readonly ReadingInput[];
  /** Required when the batch changes a stored reading. */
  correctionReason?: string;
}

export interface PostReadingsResult {
  meterId: string;
  received: number;
  created: number;
  corrected: number;
  unchanged: number;
}

export interface StoredReading {
  /** The reading's id within its meter (readingId). */
  id: string;
  start: string;
  end: string;
  days: number;
  quantity: number;
  estimated: boolean;
  cost: number | null;
}

/**
 * Names record `index` (and optionally one of its fields) for messages. The
 * HTTP layer passes one that says "row 5, field end" for CSV bodies.
 */
export type RecordLocator = (index: number, field?: string) => string;

export const jsonLocator =
  (collection: string): RecordLocator =>
  (index, field) =>
    field ? `${collection}[${index}].${field}` : `${collection}[${index}]`;

/** The values a reading carries besides its key, as stored. */
interface ReadingValues {
  quantity: number;
  estimated: number;
  cost: number | null;
}

interface Classified {
  created: { index: number; row: NewReadingRow }[];
  corrected: { index: number; before: ReadingRow; after: ReadingValues }[];
  unchanged: number;
}

export async function postReadings(
  ctx: ServiceContext,
  meterId: string,
  input: PostReadingsInput,
  locate: RecordLocator = jsonLocator('readings'),
): Promise<PostReadingsResult> {
  const readings = input.readings;
  checkBatch(readings, locate);
  const reason = input.correctionReason?.trim() || undefined;

  return inTransaction(ctx, async (trx) => {
    await getMeterRow(trx, ctx.principal.organisationId, meterId);
    // PostgreSQL checks the whole batch against the database in one set-based statement (readings-postgres.ts);
    // SQLite, in-process and already fast, reads the stored readings around the batch and merges.
    const postgres = ctx.store.dialect === 'postgres';
    let classified: Classified;
    let windows: FrozenWindow[];
    if (postgres) {
      const contacts = await batchContacts(trx, meterId, readings, PROTECTING_STATUSES);
      classified = classify(readings, (index) => contacts.stored.get(index) ?? [], ctx.now, meterId, locate);
      windows = windowsTouched(contacts.frozen, classified);
    } else {
      const stored = await storedAround(trx, meterId, readings);
      classified = classify(
        readings,
        (_, reading) => overlapping(stored, reading.start, reading.end),
        ctx.now,
        meterId,
        locate,
      );
      windows = await frozenWindowsForMeter(trx, meterId);
    }

    const writes = [
      ...classified.created.map(({ index, row }) => ({ index, start: row.period_start, end: row.period_end })),
      ...classified.corrected.map(({ index, before }) => ({
        index,
        start: before.period_start,
        end: before.period_end,
      })),
    ];
    assertOutsideFrozenWindows(windows, writes, (write) => locate(write.index), 'this batch');
    if (classified.corrected.length > 0 && !reason) {
      const errors = classified.corrected.slice(0, MAX_LISTED_ERRORS).map(({ index, before, after }) => ({
        field: locate(index, firstDifference(before, after)),
        message: `differs from the stored reading ${before.period_start}..${before.period_end} (${describeValues(before)} stored, ${describeValues(after)} sent)`,
      }));
      throw new DomainError(
        'conflict',
        `${summarise(errors, classified.corrected.length)}; to correct stored readings, give a correctionReason`,
        errors,
      );
    }

    if (postgres) {
      await insertReadings(
        trx,
        meterId,
        classified.created.map(({ row }) => ({
          start: row.period_start,
          end: row.period_end,
          quantity: row.quantity,
          estimated: row.estimated,
          cost: row.cost ?? null,
        })),
        ctx.now,
      );
      await correctReadings(
        trx,
        meterId,
        classified.corrected.map(({ before, after }) => ({
          start: before.period_start,
          end: before.period_end,
          ...after,
        })),
        ctx.now,
      );
    } else {
      await insertChunked(
        trx,
        classified.created.map((c) => c.row),
      );
      for (const { before, after } of classified.corrected) {
        await trx
          .updateTable('readings')
          .set({ ...after, updated_at: ctx.now })
          .where('meter_id', '=', meterId)
          .where('period_start', '=', before.period_start)
          .where('period_end', '=', before.period_end)
          .execute();
      }
    }

    const result: PostReadingsResult = {
      meterId,
      received: readings.length,
      created: classified.created.length,
      corrected: classified.corrected.length,
      unchanged: classified.unchanged,
    };
    // A batch that changed nothing wrote nothing, so it has nothing to audit.
    if (result.created + result.corrected > 0) {
      await bumpMeterVersions(trx, [meterId]);
      await audit(trx, ctx, {
        action: 'post-readings',
        entityType: 'meter',
        entityId: meterId,
        after: {
          received: result.received,
          unchanged: result.unchanged,
          // Named fields, so the trail reads without a key to its columns.
          created: classified.created.map(({ row }) => ({
            start: row.period_start,
            end: row.period_end,
            quantity: row.quantity,
            estimated: row.estimated === 1,
            cost: row.cost,
          })),
          corrected: classified.corrected.map(({ before, after }) => ({
            start: before.period_start,
            end: before.period_end,
            before: { quantity: before.quantity, estimated: before.estimated, cost: before.cost },
            after,
          })),
          ...(classified.corrected.length > 0 ? { correctionReason: reason } : {}),
        },
      });
    }
    return result;
  });
}

/** Field checks and in-batch duplicates and overlaps, by the engine's rules, plus cost (finite, not negative, within its bound per day). */
function checkBatch(readings: readonly ReadingInput[], locate: RecordLocator): void {
  if (readings.length === 0) {
    throw new DomainError('invalid', 'readings: at least one reading is needed', [
      { field: 'readings', message: 'empty' },
    ]);
  }
  if (readings.length > MAX_RECORDS_PER_BATCH) {
    throw new DomainError(
      'invalid',
      `readings: at most ${MAX_RECORDS_PER_BATCH} per request (got ${readings.length}); send smaller batches`,
      [{ field: 'readings', message: 'too many' }],
    );
  }
  const errors: FieldError[] = [];
  for (const problem of checkReadings(readings)) {
    const related = problem.relatedIndex === undefined ? '' : ` (${locate(problem.relatedIndex)})`;
    errors.push({ field: locate(problem.index, problem.field), message: `${problem.message}${related}` });
  }
  for (let i = 0; i < readings.length; i++) {
    const cost = readings[i]!.cost;
    if (cost === undefined || cost === null) continue;
    if (!Number.isFinite(cost)) errors.push({ field: locate(i, 'cost'), message: 'not a finite number' });
    else if (cost < 0) errors.push({ field: locate(i, 'cost'), message: `negative (${cost})` });
    else {
      const beyond = beyondBoundPerDay(cost, readings[i]!.start, readings[i]!.end, MAX_COST_PER_DAY);
      if (beyond) errors.push({ field: locate(i, 'cost'), message: beyond });
    }
  }
  if (errors.length > 0) {
    throw fieldErrors('invalid', errors, MAX_LISTED_ERRORS);
  }
}

/**
 * Stored readings that could share a key with, or overlap, a reading of the
 * batch. Stored periods never overlap one another, so ordered by start they
 * are ordered by end too: only those starting inside the batch's span can
 * meet it, plus the last one starting before it (which may reach into it).
 * Both lookups run on the primary key.
 */
async function storedAround(trx: Tx, meterId: string, readings: readonly ReadingInput[]): Promise<ReadingRow[]> {
  const { from: first, to: last } = spanOf(readings)!;
  const before = await trx
    .selectFrom('readings')
    .selectAll()
    .where('meter_id', '=', meterId)
    .where('period_start', '<', first)
    .orderBy('period_start', 'desc')
    .limit(1)
    .executeTakeFirst();
  const inside = await trx
    .selectFrom('readings')
    .selectAll()
    .where('meter_id', '=', meterId)
    .where('period_start', '>=', first)
    .where('period_start', '<', last)
    .orderBy('period_start')
    .orderBy('period_end')
    .execute();
  return before ? [before, ...inside] : inside;
}

function valuesOf(reading: ReadingInput): ReadingValues {
  return { quantity: reading.quantity, estimated: reading.estimated ? 1 : 0, cost: reading.cost ?? null };
}

/**
 * A resent reading's values: a field the caller did not send keeps its stored
 * value (a corrected quantity never silently erases the stored cost or the
 * estimated flag); `cost: null` sent explicitly clears the cost.
 */
function valuesOver(stored: ReadingRow, reading: ReadingInput): ReadingValues {
  return {
    quantity: reading.quantity,
    estimated: reading.estimated === undefined ? stored.estimated : reading.estimated ? 1 : 0,
    cost: reading.cost === undefined ? stored.cost : reading.cost,
  };
}

function sameValues(stored: ReadingRow, sent: ReadingValues): boolean {
  return stored.quantity === sent.quantity && stored.estimated === sent.estimated && stored.cost === sent.cost;
}

function firstDifference(stored: ReadingRow, sent: ReadingValues): keyof ReadingValues {
  if (stored.quantity !== sent.quantity) return 'quantity';
  return stored.estimated !== sent.estimated ? 'estimated' : 'cost';
}

/**
 * Sort each reading into created, corrected or unchanged, given the stored
 * readings each one meets (same key or overlapping, in start order); a new
 * period that overlaps a stored one is a conflict naming the stored periods.
 */
function classify(
  readings: readonly ReadingInput[],
  meeting: (index: number, reading: ReadingInput) => readonly ReadingRow[],
  now: string,
  meterId: string,
  locate: RecordLocator,
): Classified {
  const out: Classified = { created: [], corrected: [], unchanged: 0 };
  const overlaps: FieldError[] = [];
  let overlapCount = 0;
  for (let index = 0; index < readings.length; index++) {
    const reading = readings[index]!;
    const clashes = meeting(index, reading);
    // Stored periods never overlap one another, so one with the same key is the only one met.
    const existing = clashes.find((row) => row.period_start === reading.start && row.period_end === reading.end);
    if (existing) {
      const values = valuesOver(existing, reading);
      if (sameValues(existing, values)) out.unchanged++;
      else out.corrected.push({ index, before: existing, after: values });
      continue;
    }
    if (clashes.length > 0) {
      overlapCount++;
      if (overlaps.length < MAX_LISTED_ERRORS) {
        overlaps.push({
          field: locate(index, 'start'),
          message: `${reading.start}..${reading.end} overlaps the stored period${clashes.length > 1 ? 's' : ''} ${clashes.map((r) => `${r.period_start}..${r.period_end}`).join(', ')}`,
        });
      }
      continue;
    }
    out.created.push({
      index,
      row: {
        meter_id: meterId,
        period_start: reading.start,
        period_end: reading.end,
        ...valuesOf(reading),
        created_at: now,
        updated_at: now,
      },
    });
  }
  if (overlaps.length > 0) {
    throw new DomainError('conflict', summarise(overlaps, overlapCount), overlaps);
  }
  return out;
}

/** The protected windows that the batch's writes (created or corrected readings) touch, in window order. */
function windowsTouched(frozen: ReadonlyMap<number, readonly FrozenWindow[]>, classified: Classified): FrozenWindow[] {
  const byId = new Map<string, FrozenWindow>();
  for (const { index } of [...classified.created, ...classified.corrected]) {
    for (const window of frozen.get(index) ?? []) byId.set(window.baselineId, window);
  }
  return [...byId.values()].sort((a, b) =>
    a.start < b.start ? -1 : a.start > b.start ? 1 : a.baselineId < b.baselineId ? -1 : 1,
  );
}

/** Stored periods meeting [start, end): a binary search for the first that ends after start, then a short walk. */
function overlapping(stored: readonly ReadingRow[], start: string, end: string): ReadingRow[] {
  let low = 0;
  let high = stored.length;
  while (low < high) {
    const mid = (low + high) >>> 1;
    if (stored[mid]!.period_end <= start) low = mid + 1;
    else high = mid;
  }
  const found: ReadingRow[] = [];
  for (let i = low; i < stored.length && stored[i]!.period_start < end; i++) found.push(stored[i]!);
  return found;
}

async function insertChunked(trx: Tx, rows: readonly NewReadingRow[]): Promise<void> {
  for (let i = 0; i < rows.length; i += INSERT_CHUNK_ROWS) {
    await trx
      .insertInto('readings')
      .values(rows.slice(i, i + INSERT_CHUNK_ROWS))
      .execute();
  }
}

function describeValues(values: ReadingValues): string {
  const cost = values.cost === null ? '' : `, cost ${values.cost}`;
  return `quantity ${values.quantity}${values.estimated ? ' (estimated)' : ''}${cost}`;
}

/** A date range [from, to); either end may be open. */
export interface DateRange {
  from?: string;
  to?: string;
}

/**
 * A reading's id within its meter: its period, "start..end" (end exclusive).
 * A meter holds one reading per period, so the period names it; the id is
 * stable across exports and needs no column.
 */
export function readingId(start: string, end: string): string {
  return `${start}..${end}`;
}

/** Readings whose period overlaps [from, to), by start, a page at a time. */
export async function listReadings(
  db: Executor,
  organisationId: string,
  meterId: string,
  query: DateRange & Partial<PageRequest> = {},
): Promise<{ meterId: string; unit: string; readings: StoredReading[] } & PageInfo> {
  checkDateRange(query);
  const request = { limit: query.limit ?? PAGE_SIZES.series.default, cursor: query.cursor };
  const after = decodeCursor('readings', request.cursor, 'ss');
  const meter = await getMeterRow(db, organisationId, meterId);
  let q = db
    .selectFrom('readings')
    .select(['period_start', 'period_end', 'quantity', 'estimated', 'cost'])
    .where('meter_id', '=', meterId);
  if (query.to !== undefined) q = q.where('period_start', '<', query.to);
  if (query.from !== undefined) q = q.where('period_end', '>', query.from);
  if (after) {
    const [start, end] = after as [string, string];
    q = q.where((eb) =>
      eb.or([eb('period_start', '>', start), eb.and([eb('period_start', '=', start), eb('period_end', '>', end)])]),
    );
  }
  const fetched = await q
    .orderBy('period_start')
    .orderBy('period_end')
    .limit(request.limit + 1)
    .execute();
  const { rows, page } = pageOf(fetched, request, 'readings', (row) => [row.period_start, row.period_end]);
  return {
    meterId,
    unit: meter.unit,
    ...page,
    readings: rows.map((row) => ({
      id: readingId(row.period_start, row.period_end),
      start: row.period_start,
      end: row.period_end,
      days: daysBetween(row.period_start, row.period_end),
      quantity: row.quantity,
      estimated: row.estimated === 1,
      cost: row.cost,
    })),
  };
}

/** A from/to pair must be real dates with from before to. */
export function checkDateRange(query: DateRange): void {
  if (query.from !== undefined && parseIsoDate(query.from) === null) {
    throw new DomainError('invalid', `query.from: not a valid date (YYYY-MM-DD): ${JSON.stringify(query.from)}`, [
      { field: 'query.from', message: 'not a date' },
    ]);
  }
  if (query.to !== undefined && parseIsoDate(query.to) === null) {
    throw new DomainError('invalid', `query.to: not a valid date (YYYY-MM-DD): ${JSON.stringify(query.to)}`, [
      { field: 'query.to', message: 'not a date' },
    ]);
  }
  if (query.from !== undefined && query.to !== undefined && query.to <= query.from) {
    throw new DomainError('invalid', `query.to: ${query.to} is not after from ${query.from}`, [
      { field: 'query.to', message: 'not after from' },
    ]);
  }
}
