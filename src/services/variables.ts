/**
 * Independent variables: named series of a facility (or of one of its
 * meters) that a baseline may carry beside the weather: occupancy, people,
 * production. Defined once (name, unit, kind, aggregation), then values are
 * posted in batches like readings: all or nothing, a changed value needs a
 * correction reason, nothing inside a frozen baseline window of a meter the
 * variable serves may change, every write on the audit trail and a new data
 * version for those meters.
 */
import {
  addDays,
  parseIsoDate,
  type VariableAggregation,
  type VariableKind,
  type VariableSeries,
} from '../engine/index.js';
import { newId } from '../store/ids.js';
import type { MeterRow, VariableRow } from '../store/schema.js';
import { bumpMeterVersions } from '../store/data-versions.js';
import { DomainError, fieldErrors, notFound, summarise, MAX_LISTED_ERRORS, type FieldError } from '../domain/errors.js';
import { MAX_RECORDS_PER_BATCH, MAX_VARIABLE_MAGNITUDE } from '../domain/limits.js';
import { audit, inTransaction, type Executor, type ServiceContext, type Tx } from './context.js';
import { getFacilityRow } from './facilities.js';
import { getMeterRow } from './meters.js';
import { assertOutsideFrozenWindows, PROTECTING_STATUSES, type FrozenWindow } from './frozen-windows.js';
import { decodeCursor, oldestFirstPage, pageOf, PAGE_SIZES, type PageInfo, type PageRequest } from './paging.js';
import { calendarSeries } from './calendars.js';
import { checkDateRange, jsonLocator, type DateRange, type RecordLocator } from './readings.js';

export interface VariableInput {
  name: string;
  unit: string;
  kind: VariableKind;
  aggregation: VariableAggregation;
  /** The meter the variable belongs to; absent for a facility-wide variable (every meter of the facility may use it). */
  meterId?: string;
}

export interface Variable {
  id: string;
  facilityId: string;
  meterId: string | null;
  name: string;
  unit: string;
  kind: VariableKind;
  aggregation: VariableAggregation;
  createdAt: string;
  createdBy: string;
}

/** One value as posted: a daily variable's by `date`, a per-period variable's by `start` and `end` (end exclusive). */
export interface VariableValueInput {
  date?: string;
  start?: string;
  end?: string;
  value: number;
}

export interface PostVariableValuesResult {
  variableId: string;
  received: number;
  created: number;
  corrected: number;
  unchanged: number;
}

export interface StoredVariableValue {
  start: string;
  end: string;
  value: number;
}

export function toVariable(row: VariableRow): Variable {
  return {
    id: row.id,
    facilityId: row.facility_id,
    meterId: row.meter_id,
    name: row.name,
    unit: row.unit,
    kind: row.kind as VariableKind,
    aggregation: row.aggregation as VariableAggregation,
    createdAt: row.created_at,
    createdBy: row.created_by,
  };
}

/** Define a variable of a facility (or of one of its meters); a name already used there is a 409. */
export async function createVariable(ctx: ServiceContext, facilityId: string, input: VariableInput): Promise<Variable> {
  const organisationId = ctx.principal.organisationId;
  return inTransaction(ctx, async (trx) => {
    await getFacilityRow(trx, organisationId, facilityId);
    if (input.meterId !== undefined) {
      const meter = await getMeterRow(trx, organisationId, input.meterId);
      if (meter.facility_id !== facilityId) {
        const message = `meter ${input.meterId} is not a meter of facility ${facilityId}`;
        throw new DomainError('invalid', `meterId: ${message}`, [{ field: 'meterId', message }]);
      }
    }
    let same = trx
      .selectFrom('variables')
      .select('id')
      .where('facility_id', '=', facilityId)
      .where('name', '=', input.name);
    same =
      input.meterId === undefined ? same.where('meter_id', 'is', null) : same.where('meter_id', '=', input.meterId);
    const existing = await same.executeTakeFirst();
    if (existing) {
      const where = input.meterId === undefined ? `facility ${facilityId}` : `meter ${input.meterId}`;
      const message = `${where} already has a variable named "${input.name}" (${existing.id})`;
      throw new DomainError('conflict', `name: ${message}`, [{ field: 'name', message }]);
    }
    const row: VariableRow = {
      id: newId('var'),
      organisation_id: organisationId,
      facility_id: facilityId,
      meter_id: input.meterId ?? null,
      name: input.name,
      unit: input.unit,
      kind: input.kind,
      aggregation: input.aggregation,
      created_at: ctx.now,
      created_by: ctx.principal.keyId,
    };
    await trx.insertInto('variables').values(row).execute();
    const variable = toVariable(row);
    await audit(trx, ctx, { action: 'create', entityType: 'variable', entityId: row.id, after: variable });
    return variable;
  });
}

/**
 * A batch that states its unit must be in the variable's: values in another
 * unit (hours posted to a variable in days) would silently rescale its
 * coefficient, so they are refused, never converted. Compared as written,
 * ignoring case and surrounding spaces.
 */
function assertSameUnit(variable: VariableRow, unit: string | undefined): void {
  if (unit === undefined || unit.trim().toLowerCase() === variable.unit.trim().toLowerCase()) return;
  const message = `the values are in "${unit.trim()}" but variable ${variable.id} ("${variable.name}") is in "${variable.unit}"; convert them or define a variable in that unit`;
  throw new DomainError('unprocessable', `unit: ${message}`, [{ field: 'unit', message }]);
}

/** The organisation's variable, or a 404 (another organisation's id included). */
export async function getVariableRow(db: Executor, organisationId: string, id: string): Promise<VariableRow> {
  const row = await db
    .selectFrom('variables')
    .selectAll()
    .where('id', '=', id)
    .where('organisation_id', '=', organisationId)
    .executeTakeFirst();
  if (!row) throw notFound('variable', id);
  return row;
}

/** A facility's variables (facility-wide and its meters' own), oldest first, a page at a time. */
export async function listVariables(
  db: Executor,
  organisationId: string,
  facilityId: string,
  request: PageRequest = { limit: PAGE_SIZES.records.default },
): Promise<{ facilityId: string; variables: Variable[] } & PageInfo> {
  await getFacilityRow(db, organisationId, facilityId);
  const { rows, page } = await oldestFirstPage(
    db
      .selectFrom('variables')
      .selectAll()
      .where('organisation_id', '=', organisationId)
      .where('facility_id', '=', facilityId),
    request,
    'variables',
  );
  return { facilityId, ...page, variables: rows.map(toVariable) };
}

/** Meters whose savings a variable can feed: its own meter, or every meter of its facility. */
async function metersServed(db: Executor, variable: VariableRow): Promise<string[]> {
  if (variable.meter_id !== null) return [variable.meter_id];
  const rows = await db.selectFrom('meters').select('id').where('facility_id', '=', variable.facility_id).execute();
  return rows.map((row) => row.id);
}

async function frozenWindowsForMeters(db: Executor, meterIds: readonly string[]): Promise<FrozenWindow[]> {
  if (meterIds.length === 0) return [];
  const rows = await db
    .selectFrom('baselines')
    .select(['id', 'meter_id', 'status', 'period_start', 'period_end'])
    .where('meter_id', 'in', meterIds)
    .where('status', 'in', PROTECTING_STATUSES)
    .orderBy('period_start')
    .orderBy('id')
    .execute();
  return rows.map((row) => ({
    baselineId: row.id,
    meterId: row.meter_id,
    status: row.status,
    start: row.period_start,
    end: row.period_end,
  }));
}

/** The batch's periods, checked: a daily variable's values by date, a per-period one's by start and end; no duplicates or overlaps. */
function periodsOfBatch(
  variable: VariableRow,
  values: readonly VariableValueInput[],
  locate: RecordLocator,
): { start: string; end: string; value: number }[] {
  if (values.length === 0)
    throw new DomainError('invalid', 'values: at least one value is needed', [{ field: 'values', message: 'empty' }]);
  if (values.length > MAX_RECORDS_PER_BATCH) {
    throw new DomainError(
      'invalid',
      `values: at most ${MAX_RECORDS_PER_BATCH} per request (got ${values.length}); send smaller batches`,
      [{ field: 'values', message: 'too many' }],
    );
  }
  const errors: FieldError[] = [];
  const periods = values.map((entry, index) => {
    let start = entry.start;
    let end = entry.end;
    if (variable.kind === 'daily') {
      if (entry.date === undefined || entry.start !== undefined || entry.end !== undefined) {
        errors.push({
          field: locate(index, 'date'),
          message: `a daily variable's value names its date (and no start or end)`,
        });
      } else if (parseIsoDate(entry.date) === null) {
        errors.push({ field: locate(index, 'date'), message: `not a calendar date: ${entry.date}` });
      } else {
        start = entry.date;
        end = addDays(entry.date, 1);
      }
    } else if (entry.date !== undefined || start === undefined || end === undefined) {
      errors.push({
        field: locate(index, 'start'),
        message: `a per-period variable's value names its start and end (end exclusive), not a date`,
      });
    } else if (parseIsoDate(start) === null) {
      errors.push({ field: locate(index, 'start'), message: `not a calendar date: ${start}` });
    } else if (parseIsoDate(end) === null) {
      errors.push({ field: locate(index, 'end'), message: `not a calendar date: ${end}` });
    } else if (!(end > start)) {
      errors.push({ field: locate(index, 'end'), message: `must be after start (${start})` });
    }
    if (!Number.isFinite(entry.value)) errors.push({ field: locate(index, 'value'), message: 'not a finite number' });
    else if (Math.abs(entry.value) > MAX_VARIABLE_MAGNITUDE) {
      errors.push({ field: locate(index, 'value'), message: `beyond ±${MAX_VARIABLE_MAGNITUDE} (${entry.value})` });
    }
    return { index, start: start ?? '', end: end ?? '', value: entry.value };
  });
  if (errors.length === 0) {
    const sorted = [...periods].sort((a, b) => (a.start < b.start ? -1 : a.start > b.start ? 1 : a.index - b.index));
    for (let i = 1; i < sorted.length; i++) {
      const previous = sorted[i - 1]!;
      const current = sorted[i]!;
      if (current.start < previous.end) {
        errors.push({
          field: locate(current.index, variable.kind === 'daily' ? 'date' : 'start'),
          message: `${current.start}..${current.end} overlaps ${previous.start}..${previous.end} (${locate(previous.index)})`,
        });
      }
    }
  }
  if (errors.length > 0) throw fieldErrors('invalid', errors, MAX_LISTED_ERRORS);
  return periods.map(({ start, end, value }) => ({ start, end, value }));
}

/**
 * Post a batch of a variable's values, all or nothing. A value for a stored
 * period that differs is a correction (needs correctionReason); a new
 * period overlapping a stored one is a 409; any change inside a frozen
 * baseline window of a meter the variable serves is a 409 'frozen'.
 */
export async function postVariableValues(
  ctx: ServiceContext,
  variableId: string,
  input: { values: readonly VariableValueInput[]; correctionReason?: string; unit?: string },
  locate: RecordLocator = jsonLocator('values'),
): Promise<PostVariableValuesResult> {
  const organisationId = ctx.principal.organisationId;
  const reason = input.correctionReason?.trim() || undefined;
  return inTransaction(ctx, async (trx) => {
    const variable = await getVariableRow(trx, organisationId, variableId);
    assertSameUnit(variable, input.unit);
    const batch = periodsOfBatch(variable, input.values, locate);
    const stored = await storedAround(trx, variableId, batch);
    const created: { index: number; start: string; end: string; value: number }[] = [];
    const corrected: { index: number; start: string; end: string; before: number; after: number }[] = [];
    let unchanged = 0;
    const overlaps: FieldError[] = [];
    batch.forEach((entry, index) => {
      const meeting = stored.filter((row) => row.period_start < entry.end && entry.start < row.period_end);
      const same = meeting.find((row) => row.period_start === entry.start && row.period_end === entry.end);
      if (same) {
        if (same.value === entry.value) unchanged++;
        else corrected.push({ index, start: entry.start, end: entry.end, before: same.value, after: entry.value });
      } else if (meeting.length > 0) {
        overlaps.push({
          field: locate(index, variable.kind === 'daily' ? 'date' : 'start'),
          message: `${entry.start}..${entry.end} overlaps the stored period ${meeting.map((r) => `${r.period_start}..${r.period_end}`).join(', ')}`,
        });
      } else created.push({ index, ...entry });
    });
    if (overlaps.length > 0) throw fieldErrors('conflict', overlaps, MAX_LISTED_ERRORS);
    const meters = await metersServed(trx, variable);
    assertOutsideFrozenWindows(
      await frozenWindowsForMeters(trx, meters),
      [...created, ...corrected],
      (write) => locate(write.index),
      'this batch',
    );
    if (corrected.length > 0 && !reason) {
      const errors = corrected.slice(0, MAX_LISTED_ERRORS).map((c) => ({
        field: locate(c.index, 'value'),
        message: `differs from the stored value of ${c.start}..${c.end} (${c.before} stored, ${c.after} sent)`,
      }));
      throw new DomainError(
        'conflict',
        `${summarise(errors, corrected.length)}; to correct stored values, give a correctionReason`,
        errors,
      );
    }
    for (let i = 0; i < created.length; i += 500) {
      const rows = created.slice(i, i + 500).map((c) => ({
        variable_id: variableId,
        period_start: c.start,
        period_end: c.end,
        value: c.value,
        updated_at: ctx.now,
      }));
      await trx.insertInto('variable_values').values(rows).execute();
    }
    for (const c of corrected) {
      await trx
        .updateTable('variable_values')
        .set({ value: c.after, updated_at: ctx.now })
        .where('variable_id', '=', variableId)
        .where('period_start', '=', c.start)
        .execute();
    }
    const result = {
      variableId,
      received: batch.length,
      created: created.length,
      corrected: corrected.length,
      unchanged,
    };
    if (created.length + corrected.length > 0) {
      await bumpMeterVersions(trx, meters);
      await audit(trx, ctx, {
        action: 'post-variable-values',
        entityType: 'variable',
        entityId: variableId,
        after: {
          received: result.received,
          unchanged,
          created: created.map(({ start, end, value }) => ({ start, end, value })),
          corrected: corrected.map(({ start, end, before, after }) => ({ start, end, before, after })),
          ...(corrected.length > 0 ? { correctionReason: reason } : {}),
        },
      });
    }
    return result;
  });
}

/** Stored values that could meet the batch: those starting inside its span, and the last one starting before it. */
async function storedAround(trx: Tx, variableId: string, batch: readonly { start: string; end: string }[]) {
  const first = batch.reduce((min, e) => (e.start < min ? e.start : min), batch[0]!.start);
  const last = batch.reduce((max, e) => (e.end > max ? e.end : max), batch[0]!.end);
  const before = await trx
    .selectFrom('variable_values')
    .selectAll()
    .where('variable_id', '=', variableId)
    .where('period_start', '<', first)
    .orderBy('period_start', 'desc')
    .limit(1)
    .executeTakeFirst();
  const inside = await trx
    .selectFrom('variable_values')
    .selectAll()
    .where('variable_id', '=', variableId)
    .where('period_start', '>=', first)
    .where('period_start', '<', last)
    .orderBy('period_start')
    .execute();
  return before ? [before, ...inside] : inside;
}

/** A variable's values whose period overlaps [from, to), by start, a page at a time. */
export async function listVariableValues(
  db: Executor,
  organisationId: string,
  variableId: string,
  query: DateRange & Partial<PageRequest> = {},
): Promise<{ variable: Variable; values: StoredVariableValue[] } & PageInfo> {
  checkDateRange(query);
  const request = { limit: query.limit ?? PAGE_SIZES.series.default, cursor: query.cursor };
  const after = decodeCursor('variable-values', request.cursor, 's');
  const variable = await getVariableRow(db, organisationId, variableId);
  let q = db
    .selectFrom('variable_values')
    .select(['period_start', 'period_end', 'value'])
    .where('variable_id', '=', variableId);
  if (query.to !== undefined) q = q.where('period_start', '<', query.to);
  if (query.from !== undefined) q = q.where('period_end', '>', query.from);
  if (after) q = q.where('period_start', '>', after[0] as string);
  const fetched = await q
    .orderBy('period_start')
    .limit(request.limit + 1)
    .execute();
  const { rows, page } = pageOf(fetched, request, 'variable-values', (row) => [row.period_start]);
  return {
    variable: toVariable(variable),
    ...page,
    values: rows.map((row) => ({ start: row.period_start, end: row.period_end, value: row.value })),
  };
}

/**
 * The variables named for a meter's fit, resolved by name: the meter's own
 * variable first, else its facility's. An unknown name is a 422 naming
 * `field[i]`. Values are those overlapping [from, to).
 */
export async function variableSeriesForMeter(
  db: Executor,
  meter: MeterRow,
  names: readonly string[],
  window: { from: string; to: string },
  field = 'options.variables',
): Promise<{ series: (VariableSeries & { id: string; unit: string })[]; variables: Variable[] }> {
  if (names.length === 0) return { series: [], variables: [] };
  const rows = await db
    .selectFrom('variables')
    .selectAll()
    .where('facility_id', '=', meter.facility_id)
    .where('name', 'in', [...names])
    .where((eb) => eb.or([eb('meter_id', 'is', null), eb('meter_id', '=', meter.id)]))
    .execute();
  const variables = names.map((name, i) => {
    const row =
      rows.find((r) => r.name === name && r.meter_id === meter.id) ??
      rows.find((r) => r.name === name && r.meter_id === null);
    if (!row) {
      const message = `no variable named "${name}" on meter ${meter.id} or its facility ${meter.facility_id}; define it first`;
      throw new DomainError('unprocessable', `${field}[${i}]: ${message}`, [{ field: `${field}[${i}]`, message }]);
    }
    return row;
  });
  const series = await seriesOf(db, variables, window);
  return { series, variables: variables.map(toVariable) };
}

/** The values of these variables overlapping [from, to), as series carrying their ids and units. */
export async function seriesOf(
  db: Executor,
  variables: readonly Pick<VariableRow, 'id' | 'name' | 'unit' | 'aggregation'>[],
  window: { from: string; to: string },
): Promise<(VariableSeries & { id: string; unit: string })[]> {
  const series: (VariableSeries & { id: string; unit: string })[] = [];
  for (const row of variables) {
    const values = await db
      .selectFrom('variable_values')
      .select(['period_start', 'period_end', 'value'])
      .where('variable_id', '=', row.id)
      .where('period_start', '<', window.to)
      .where('period_end', '>', window.from)
      .orderBy('period_start')
      .execute();
    series.push({
      id: row.id,
      unit: row.unit,
      name: row.name,
      aggregation: row.aggregation as VariableAggregation,
      values: values.map((v) => ({ start: v.period_start, end: v.period_end, value: v.value })),
    });
  }
  return series;
}

/**
 * A frozen model's variables over [from, to): stored variables' values by
 * their ids, day-type indicators from the facility calendar as it stands.
 */
export async function reportingSeries(
  db: Executor,
  variables: readonly {
    id: string;
    name: string;
    unit: string;
    aggregation: VariableAggregation;
    source?: 'calendar';
  }[],
  window: { from: string; to: string },
): Promise<VariableSeries[]> {
  const stored = await seriesOf(
    db,
    variables.filter((v) => v.source !== 'calendar'),
    window,
  );
  const calendarFacilities = [...new Set(variables.filter((v) => v.source === 'calendar').map((v) => v.id))];
  const days: VariableSeries[] = [];
  for (const facilityId of calendarFacilities) {
    const all = await calendarSeries(db, facilityId, window, 'calendar');
    days.push(...all.filter((s) => variables.some((v) => v.source === 'calendar' && v.name === s.name)));
  }
  return [...stored, ...days];
}
