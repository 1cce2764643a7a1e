/**
 * Frozen baseline windows: the readings and weather a frozen baseline was
 * fitted on must stay as they were, or the baseline could no longer be
 * reproduced. A superseded baseline keeps protecting its window too: it is
 * history, and history does not change.
 */
import { addDays } from '../engine/index.js';
import type { BaselineStatus } from '../store/schema.js';
import { DomainError, type FieldError, andMore, MAX_LISTED_ERRORS } from '../domain/errors.js';
import type { Executor } from './context.js';

/** Baseline statuses whose window is closed to new or changed data. */
export const PROTECTING_STATUSES: readonly BaselineStatus[] = ['frozen', 'superseded'];

export interface FrozenWindow {
  baselineId: string;
  meterId: string;
  status: BaselineStatus;
  /** The window [start, end), ISO dates. */
  start: string;
  end: string;
}

/** Something a request would write, covering [start, end). */
export interface ProtectedWrite {
  start: string;
  end: string;
}

const NAMED_IN_DETAIL = 5;

export async function frozenWindowsForMeter(db: Executor, meterId: string): Promise<FrozenWindow[]> {
  const rows = await db
    .selectFrom('baselines')
    .select(['id', 'meter_id', 'status', 'period_start', 'period_end'])
    .where('meter_id', '=', meterId)
    .where('status', 'in', PROTECTING_STATUSES)
    .orderBy('period_start')
    .orderBy('id')
    .execute();
  return rows.map(toWindow);
}

/** Windows of every meter read against this station: its weather fed their fits. */
export async function frozenWindowsForStation(db: Executor, stationId: string): Promise<FrozenWindow[]> {
  const rows = await db
    .selectFrom('baselines')
    .innerJoin('meters', 'meters.id', 'baselines.meter_id')
    .select([
      'baselines.id',
      'baselines.meter_id',
      'baselines.status',
      'baselines.period_start',
      'baselines.period_end',
    ])
    .where('meters.weather_station_id', '=', stationId)
    .where('baselines.status', 'in', PROTECTING_STATUSES)
    .orderBy('baselines.period_start')
    .orderBy('baselines.id')
    .execute();
  return rows.map(toWindow);
}

function toWindow(row: {
  id: string;
  meter_id: string;
  status: BaselineStatus;
  period_start: string;
  period_end: string;
}): FrozenWindow {
  return {
    baselineId: row.id,
    meterId: row.meter_id,
    status: row.status,
    start: row.period_start,
    end: row.period_end,
  };
}

/** ISO dates compare as text, so [a, b) and [c, d) meet when a < d and c < b. */
function intersects(write: ProtectedWrite, window: FrozenWindow): boolean {
  return write.start < window.end && window.start < write.end;
}

/**
 * Throw a 409 'frozen' problem if any write touches a protected window. The
 * detail names the first such writes (by `name`, called only for those) and
 * the baseline; `errors` lists them all (up to a hundred).
 */
export function assertOutsideFrozenWindows<W extends ProtectedWrite>(
  windows: readonly FrozenWindow[],
  writes: readonly W[],
  name: (write: W) => string,
  what = 'this change',
): void {
  if (windows.length === 0) return;
  const hits: { write: W; window: FrozenWindow }[] = [];
  for (const write of writes) {
    for (const window of windows) {
      if (intersects(write, window)) {
        hits.push({ write, window });
        break;
      }
    }
  }
  const first = hits[0];
  if (!first) return;
  const baselines = [...new Set(hits.map((hit) => hit.window.baselineId))];
  const named = hits
    .slice(0, NAMED_IN_DETAIL)
    .map((hit) => `${name(hit.write)} (${describeSpan(hit.write)})`)
    .join(', ');
  const more = andMore(hits.length, NAMED_IN_DETAIL);
  const errors: FieldError[] = hits.slice(0, MAX_LISTED_ERRORS).map(({ write, window }) => ({
    field: name(write),
    message: `${describeSpan(write)} is inside the window ${describeWindow(window)} of ${window.status} baseline ${window.baselineId}`,
  }));
  throw new DomainError(
    'frozen',
    `${what} would change ${named}${more}, inside the window ${describeWindow(first.window)} of ${first.window.status} baseline ${first.window.baselineId} (meter ${first.window.meterId}); data a frozen baseline was fitted on cannot change`,
    errors,
    { baselines },
  );
}

function describeWindow(window: FrozenWindow): string {
  return `${window.start}..${window.end}`;
}

/** A one-day span reads as its date. */
function describeSpan(write: ProtectedWrite): string {
  return addDays(write.start, 1) === write.end ? write.start : `${write.start}..${write.end}`;
}
