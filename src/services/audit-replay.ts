/**
 * The audit trail as the proof of the tables. Every write that can move a
 * result records its full values on the trail (readings created and
 * corrected, observed and filled weather days, rate schedules, contracts,
 * normal years, adjustments and their withdrawal, API keys, independent
 * variables and their values, facility calendars). Replaying an
 * organisation's trail in sequence order rebuilds what each of those tables
 * should hold; any stored row that differs, or that the trail never wrote,
 * was changed outside the service and is named.
 *
 * Frozen baselines are checked apart (frozen-baselines-check.ts): their
 * content is compared with the hash their freeze row recorded.
 */
import { canonicalJson } from '../lib/canonical-json.js';
import { publicKey } from '../store/api-keys.js';
import { auditRowsInOrder, organisationTableRows, type OrganisationTableRows } from '../store/organisation-tables.js';
import type { AuditRow } from '../store/schema.js';
import { toAdjustment } from './adjustments.js';
import { toContract } from './contracts.js';
import { toVariable } from './variables.js';
import type { Executor } from './context.js';

/** One stored row that the audit trail does not account for. */
export interface StateDifference {
  /** The table, as the API names it: readings, observations, rates, contracts, normal-years, adjustments, api-keys, baselines. */
  table: string;
  /** Which row: meter or station id and its period or date, or the entity's id. */
  key: string;
  difference: string;
}

export interface ReplayVerdict {
  ok: boolean;
  /** Rows compared per table (stored rows and rows the trail expects, counted once). */
  compared: Record<string, number>;
  /** All differences found. */
  differenceCount: number;
  /** The first differences, at most MAX_LISTED_DIFFERENCES. */
  differences: StateDifference[];
}

export const MAX_LISTED_DIFFERENCES = 100;

type ReadingValues = { quantity: number; estimated: number; cost: number | null };
type DayValues = { temp: number; tmin: number | null; tmax: number | null; fill: string | null };
type RateValues = { from: string; to: string | null; price: number; escalation: number };

/** What the trail says each table should hold, keyed as StateDifference.key. */
interface ExpectedState {
  readings: Map<string, ReadingValues>;
  observations: Map<string, DayValues>;
  rates: Map<string, { currency: string | null; rates: RateValues[] }>;
  contracts: Map<string, string>;
  normalYears: Map<string, { source: string; contentHash: string; temps: string }>;
  adjustments: Map<string, string>;
  apiKeys: Map<string, string>;
  variables: Map<string, string>;
  variableValues: Map<string, { end: string; value: number }>;
  calendars: Map<string, string>;
}

const valueKey = (variableId: string, start: string) => `variable ${variableId} ${start}`;

const readingKey = (meterId: string, start: string, end: string) => `meter ${meterId} ${start}..${end}`;
const dayKey = (stationId: string, date: string) => `station ${stationId} ${date}`;

type Json = Record<string, unknown>;
const afterOf = (row: AuditRow): Json | null => (row.after_json === null ? null : (JSON.parse(row.after_json) as Json));

/** Apply one audit row to the expected state. Rows of other kinds change no compared table. */
function apply(state: ExpectedState, row: AuditRow): void {
  const after = afterOf(row);
  if (after === null) return;
  const id = row.entity_id;
  switch (`${row.entity_type}:${row.action}`) {
    case 'meter:post-readings': {
      for (const r of (after.created ?? []) as {
        start: string;
        end: string;
        quantity: number;
        estimated: boolean;
        cost: number | null;
      }[])
        state.readings.set(readingKey(id, r.start, r.end), {
          quantity: r.quantity,
          estimated: r.estimated ? 1 : 0,
          cost: r.cost,
        });
      for (const r of (after.corrected ?? []) as { start: string; end: string; after: ReadingValues }[])
        state.readings.set(readingKey(id, r.start, r.end), { ...r.after, estimated: r.after.estimated ? 1 : 0 });
      return;
    }
    case 'weather-station:upsert-observations':
    case 'weather-station:import-observations': {
      const days = (row.action === 'upsert-observations' && !('days' in after) ? after : after.days) as Record<
        string,
        { temp: number; tmin?: number | null; tmax?: number | null }
      >;
      for (const [date, v] of Object.entries(days ?? {}))
        state.observations.set(dayKey(id, date), {
          temp: v.temp,
          tmin: v.tmin ?? null,
          tmax: v.tmax ?? null,
          fill: null,
        });
      return;
    }
    case 'weather-station:fill-weather-gaps': {
      for (const [date, v] of Object.entries((after.days ?? {}) as Record<string, { temp: number; filled: string }>))
        state.observations.set(dayKey(id, date), { temp: v.temp, tmin: null, tmax: null, fill: v.filled });
      return;
    }
    case 'weather-station:put-normal-year': {
      state.normalYears.set(id, {
        source: after.source as string,
        contentHash: after.contentHash as string,
        temps: canonicalJson(after.temps),
      });
      return;
    }
    case 'meter:put-rates': {
      state.rates.set(id, {
        currency: (after.currency as string | null) ?? null,
        rates: (after.rates ?? []) as RateValues[],
      });
      return;
    }
    case 'facility:put-contract':
      state.contracts.set(id, canonicalJson(after));
      return;
    case 'adjustment:create':
    case 'adjustment:withdraw':
      state.adjustments.set(id, canonicalJson(after));
      return;
    case 'api-key:create':
    case 'api-key:revoke':
      state.apiKeys.set(id, canonicalJson(after));
      return;
    case 'variable:create':
      state.variables.set(id, canonicalJson(after));
      return;
    case 'variable:post-variable-values': {
      for (const v of (after.created ?? []) as { start: string; end: string; value: number }[])
        state.variableValues.set(valueKey(id, v.start), { end: v.end, value: v.value });
      for (const v of (after.corrected ?? []) as { start: string; end: string; after: number }[])
        state.variableValues.set(valueKey(id, v.start), { end: v.end, value: v.after });
      return;
    }
    case 'facility:create-calendar':
    case 'facility:replace-calendar':
      state.calendars.set(id, canonicalJson(after));
      return;
  }
}

const num = (value: number | null) => (value === null ? 'none' : String(value));

/** Compare expected and stored values of one table; both maps keyed alike. */
function compareTable<T>(
  table: string,
  expected: Map<string, T>,
  stored: Map<string, T>,
  describe: (want: T, got: T) => string | null,
  out: StateDifference[],
): number {
  const keys = new Set([...expected.keys(), ...stored.keys()]);
  for (const key of keys) {
    const want = expected.get(key);
    const got = stored.get(key);
    if (want === undefined) out.push({ table, key, difference: 'stored, but no audit row wrote it' });
    else if (got === undefined)
      out.push({ table, key, difference: 'written on the audit trail, but missing from the table' });
    else {
      const difference = describe(want, got);
      if (difference !== null) out.push({ table, key, difference });
    }
  }
  return keys.size;
}

/** Differences field by field, "field: X stored, Y on the audit trail". */
function fieldDifferences(want: Record<string, unknown>, got: Record<string, unknown>): string | null {
  const parts: string[] = [];
  for (const field of Object.keys(want)) {
    const a = got[field] ?? null;
    const b = want[field] ?? null;
    if (canonicalJson(a) !== canonicalJson(b))
      parts.push(
        `${field}: ${typeof a === 'number' || a === null ? num(a as number | null) : canonicalJson(a)} stored, ${typeof b === 'number' || b === null ? num(b as number | null) : canonicalJson(b)} on the audit trail`,
      );
  }
  return parts.length === 0 ? null : parts.join('; ');
}

const wholeDifference = (want: string, got: string) =>
  want === got ? null : `stored ${got}; the audit trail says ${want}`;

function storedState(rows: OrganisationTableRows): ExpectedState {
  const rates = new Map<string, { currency: string | null; rates: RateValues[] }>();
  for (const r of [...rows.rates].sort((a, b) => a.effective_from.localeCompare(b.effective_from))) {
    const schedule = rates.get(r.meter_id) ?? { currency: r.currency, rates: [] };
    schedule.rates.push({ from: r.effective_from, to: r.effective_to, price: r.price, escalation: r.escalation });
    rates.set(r.meter_id, schedule);
  }
  return {
    readings: new Map(
      rows.readings.map((r) => [
        readingKey(r.meter_id, r.period_start, r.period_end),
        { quantity: r.quantity, estimated: r.estimated, cost: r.cost },
      ]),
    ),
    observations: new Map(
      rows.observations.map((o) => [
        dayKey(o.station_id, o.date),
        { temp: o.temp, tmin: o.tmin, tmax: o.tmax, fill: o.fill_method },
      ]),
    ),
    rates,
    contracts: new Map(rows.contracts.map((c) => [c.facility_id, canonicalJson(toContract(c))])),
    normalYears: new Map(
      rows.normalYears.map((n) => [
        n.station_id,
        { source: n.source, contentHash: n.content_hash, temps: canonicalJson(JSON.parse(n.temps_json)) },
      ]),
    ),
    adjustments: new Map(rows.adjustments.map((a) => [a.id, canonicalJson(toAdjustment(a))])),
    apiKeys: new Map(rows.apiKeys.map((k) => [k.id, canonicalJson(publicKey(k))])),
    variables: new Map(rows.variables.map((v) => [v.id, canonicalJson(toVariable(v))])),
    variableValues: new Map(
      rows.variableValues.map((v) => [valueKey(v.variable_id, v.period_start), { end: v.period_end, value: v.value }]),
    ),
    calendars: new Map(rows.calendars.map((c) => [c.facility_id, canonicalJson(JSON.parse(c.calendar_json))])),
  };
}

function emptyState(): ExpectedState {
  return {
    readings: new Map(),
    observations: new Map(),
    rates: new Map(),
    contracts: new Map(),
    normalYears: new Map(),
    adjustments: new Map(),
    apiKeys: new Map(),
    variables: new Map(),
    variableValues: new Map(),
    calendars: new Map(),
  };
}

/** Compare the state the trail rebuilds with the stored one. */
export function compareStates(expected: ExpectedState, stored: ExpectedState): ReplayVerdict {
  const differences: StateDifference[] = [];
  const compared: Record<string, number> = {};
  compared.readings = compareTable('readings', expected.readings, stored.readings, fieldDifferences, differences);
  compared.observations = compareTable(
    'observations',
    expected.observations,
    stored.observations,
    fieldDifferences,
    differences,
  );
  // A meter whose schedule was emptied has no rows: the trail's empty schedule is the same state.
  for (const [meterId, schedule] of expected.rates)
    if (schedule.rates.length === 0 && !stored.rates.has(meterId)) expected.rates.delete(meterId);
  compared.rates = compareTable(
    'rates',
    expected.rates,
    stored.rates,
    (want, got) => wholeDifference(canonicalJson(want), canonicalJson(got)),
    differences,
  );
  compared.contracts = compareTable('contracts', expected.contracts, stored.contracts, wholeDifference, differences);
  compared['normal-years'] = compareTable(
    'normal-years',
    expected.normalYears,
    stored.normalYears,
    fieldDifferences,
    differences,
  );
  compared.adjustments = compareTable(
    'adjustments',
    expected.adjustments,
    stored.adjustments,
    wholeDifference,
    differences,
  );
  compared['api-keys'] = compareTable('api-keys', expected.apiKeys, stored.apiKeys, wholeDifference, differences);
  compared.variables = compareTable('variables', expected.variables, stored.variables, wholeDifference, differences);
  compared['variable-values'] = compareTable(
    'variable-values',
    expected.variableValues,
    stored.variableValues,
    fieldDifferences,
    differences,
  );
  compared.calendars = compareTable('calendars', expected.calendars, stored.calendars, wholeDifference, differences);
  return {
    ok: differences.length === 0,
    compared,
    differenceCount: differences.length,
    differences: differences.slice(0, MAX_LISTED_DIFFERENCES),
  };
}

/** Replay the organisation's trail and compare every result-bearing table with it. */
export async function replayAuditTrail(db: Executor, organisationId: string): Promise<ReplayVerdict> {
  const expected = emptyState();
  for await (const row of auditRowsInOrder(db, organisationId)) apply(expected, row);
  return compareStates(expected, storedState(await organisationTableRows(db, organisationId)));
}
