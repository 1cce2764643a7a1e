/**
 * Facility calendars: one per facility, replaced whole (PUT). A calendar
 * feeds fits that ask for day types (options.dayTypes), so a change that
 * would alter the day type of any day inside a frozen baseline window of one
 * of the facility's meters is refused (409 'frozen'), like any data a frozen
 * baseline was fitted on; every change is on the audit trail and gives the
 * facility's meters a new data version.
 */
import {
  addDays,
  checkCalendar,
  dayTypeSeries,
  dayTypesOver,
  type FacilityCalendar,
  type VariableSeries,
} from '../engine/index.js';
import { fromStoredJson, toStoredJson } from '../store/baseline-content.js';
import { bumpFacilityMeterVersions } from '../store/data-versions.js';
import { DomainError, fieldErrors, MAX_LISTED_ERRORS } from '../domain/errors.js';
import { audit, inTransaction, type Executor, type ServiceContext } from './context.js';
import { getFacilityRow } from './facilities.js';
import { PROTECTING_STATUSES } from './frozen-windows.js';
import { jsonLocator, type RecordLocator } from './readings.js';

export interface StoredCalendar extends FacilityCalendar {
  facilityId: string;
  updatedAt: string;
  updatedBy: string;
}

/** The facility's calendar, or null when it has none. */
export async function loadCalendar(db: Executor, facilityId: string): Promise<StoredCalendar | null> {
  const row = await db
    .selectFrom('facility_calendars')
    .selectAll()
    .where('facility_id', '=', facilityId)
    .executeTakeFirst();
  if (!row) return null;
  return {
    facilityId,
    ...fromStoredJson<FacilityCalendar>(row.calendar_json),
    updatedAt: row.updated_at,
    updatedBy: row.updated_by,
  };
}

export async function getCalendar(db: Executor, organisationId: string, facilityId: string): Promise<StoredCalendar> {
  await getFacilityRow(db, organisationId, facilityId);
  const calendar = await loadCalendar(db, facilityId);
  if (!calendar)
    throw new DomainError(
      'not-found',
      `facility ${facilityId} has no calendar (PUT /v1/facilities/${facilityId}/calendar)`,
    );
  return calendar;
}

/** "exceptions[3].end" as the caller sent it ("row 5, field end" for a CSV body); other fields as they are. */
function exceptionField(field: string, locate: RecordLocator): string {
  const match = /^exceptions\[(\d+)\](?:\.(\w+))?$/.exec(field);
  return match ? locate(Number(match[1]), match[2]) : field;
}

/** Replace the facility's calendar, all or nothing. */
export async function putCalendar(
  ctx: ServiceContext,
  facilityId: string,
  input: FacilityCalendar,
  locate: RecordLocator = jsonLocator('exceptions'),
): Promise<StoredCalendar> {
  const calendar: FacilityCalendar = {
    dayTypes: [...input.dayTypes],
    weekly: [...input.weekly],
    exceptions: input.exceptions.map((e) => ({
      start: e.start,
      end: e.end,
      dayType: e.dayType,
      ...(e.note !== undefined ? { note: e.note } : {}),
    })),
  };
  const problems = checkCalendar(calendar).map((problem) => ({
    ...problem,
    field: exceptionField(problem.field, locate),
  }));
  if (problems.length > 0) throw fieldErrors('invalid', problems, MAX_LISTED_ERRORS);
  return inTransaction(ctx, async (trx) => {
    await getFacilityRow(trx, ctx.principal.organisationId, facilityId);
    const before = await loadCalendar(trx, facilityId);
    const windows = await trx
      .selectFrom('baselines')
      .innerJoin('meters', 'meters.id', 'baselines.meter_id')
      .select(['baselines.id', 'baselines.status', 'baselines.period_start', 'baselines.period_end'])
      .where('meters.facility_id', '=', facilityId)
      .where('baselines.status', 'in', PROTECTING_STATUSES)
      .execute();
    for (const window of windows) {
      // A first calendar changes nothing a frozen fit saw: no fit could use a calendar that did not exist.
      if (!before) break;
      const old = dayTypesOver(before, window.period_start, window.period_end);
      const now = dayTypesOver(calendar, window.period_start, window.period_end);
      const changed = now.findIndex((type, i) => type !== old[i]);
      if (changed < 0) continue;
      const date = addDays(window.period_start, changed);
      const what = `the day type of ${date} (${old[changed]} → ${now[changed]})`;
      throw new DomainError(
        'frozen',
        `this calendar would change ${what} inside the window ${window.period_start}..${window.period_end} of ${window.status} baseline ${window.id}; data a frozen baseline was fitted on cannot change`,
        [{ field: 'exceptions', message: `changes days inside ${window.period_start}..${window.period_end}` }],
        { baselines: [window.id] },
      );
    }
    const row = {
      facility_id: facilityId,
      organisation_id: ctx.principal.organisationId,
      calendar_json: toStoredJson(calendar),
      updated_at: ctx.now,
      updated_by: ctx.principal.keyId,
    };
    if (before) await trx.updateTable('facility_calendars').set(row).where('facility_id', '=', facilityId).execute();
    else await trx.insertInto('facility_calendars').values(row).execute();
    await bumpFacilityMeterVersions(trx, facilityId);
    const stored: StoredCalendar = { facilityId, ...calendar, updatedAt: ctx.now, updatedBy: ctx.principal.keyId };
    const {
      facilityId: _f,
      updatedAt: _a,
      updatedBy: _b,
      ...beforeCalendar
    } = before ?? { facilityId, updatedAt: '', updatedBy: '' };
    await audit(trx, ctx, {
      action: before ? 'replace-calendar' : 'create-calendar',
      entityType: 'facility',
      entityId: facilityId,
      ...(before ? { before: beforeCalendar } : {}),
      after: calendar,
    });
    return stored;
  });
}

/** The facility calendar's day-type indicators over [from, to); a 422 naming `field` when the facility has no calendar. */
export async function calendarSeries(
  db: Executor,
  facilityId: string,
  window: { from: string; to: string },
  field: string,
): Promise<VariableSeries[]> {
  const calendar = await loadCalendar(db, facilityId);
  if (!calendar) {
    const message = `facility ${facilityId} has no calendar: PUT /v1/facilities/${facilityId}/calendar first`;
    throw new DomainError('unprocessable', `${field}: ${message}`, [{ field, message }]);
  }
  return dayTypeSeries(calendar, window.from, window.to);
}
