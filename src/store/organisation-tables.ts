/**
 * An organisation's stored rows, table by table, as the full audit replay
 * compares them with what its audit trail says they should be. Whole tables
 * are read: the replay is an auditor's check, not a request path.
 */
import type { Selectable } from 'kysely';
import type { AuditRow, Database } from './schema.js';
import type { Executor } from './executor.js';

export type OrganisationTableRows = {
  readings: Selectable<Database['readings']>[];
  observations: Selectable<Database['weather_observations']>[];
  rates: Selectable<Database['rates']>[];
  contracts: Selectable<Database['contracts']>[];
  normalYears: Selectable<Database['normal_years']>[];
  adjustments: Selectable<Database['adjustments']>[];
  apiKeys: Selectable<Database['api_keys']>[];
  variables: Selectable<Database['variables']>[];
  variableValues: Selectable<Database['variable_values']>[];
  calendars: Selectable<Database['facility_calendars']>[];
};

/** Every row of the organisation's result-bearing tables. */
export async function organisationTableRows(db: Executor, organisationId: string): Promise<OrganisationTableRows> {
  const meterIds = db.selectFrom('meters').select('id').where('organisation_id', '=', organisationId);
  const stationIds = db.selectFrom('weather_stations').select('id').where('organisation_id', '=', organisationId);
  const variableIds = db.selectFrom('variables').select('id').where('organisation_id', '=', organisationId);
  const [
    readings,
    observations,
    rates,
    contracts,
    normalYears,
    adjustments,
    apiKeys,
    variables,
    variableValues,
    calendars,
  ] = await Promise.all([
    db.selectFrom('readings').selectAll().where('meter_id', 'in', meterIds).execute(),
    db.selectFrom('weather_observations').selectAll().where('station_id', 'in', stationIds).execute(),
    db.selectFrom('rates').selectAll().where('meter_id', 'in', meterIds).execute(),
    db.selectFrom('contracts').selectAll().where('organisation_id', '=', organisationId).execute(),
    db.selectFrom('normal_years').selectAll().where('station_id', 'in', stationIds).execute(),
    db.selectFrom('adjustments').selectAll().where('organisation_id', '=', organisationId).execute(),
    db.selectFrom('api_keys').selectAll().where('organisation_id', '=', organisationId).execute(),
    db.selectFrom('variables').selectAll().where('organisation_id', '=', organisationId).execute(),
    db.selectFrom('variable_values').selectAll().where('variable_id', 'in', variableIds).execute(),
    db.selectFrom('facility_calendars').selectAll().where('organisation_id', '=', organisationId).execute(),
  ]);
  return {
    readings,
    observations,
    rates,
    contracts,
    normalYears,
    adjustments,
    apiKeys,
    variables,
    variableValues,
    calendars,
  };
}

/** The organisation's frozen and superseded baselines: the ones whose content was fixed by a freeze. */
export function fixedBaselineRows(db: Executor, organisationId: string) {
  return db
    .selectFrom('baselines')
    .selectAll()
    .where('organisation_id', '=', organisationId)
    .where('status', 'in', ['frozen', 'superseded'])
    .orderBy('id')
    .execute();
}

/** The organisation's audit rows in sequence order, a page at a time. */
export async function* auditRowsInOrder(
  db: Executor,
  organisationId: string,
  pageSize = 2000,
): AsyncGenerator<AuditRow> {
  let afterSeq = 0;
  for (;;) {
    const page = await db
      .selectFrom('audit_log')
      .selectAll()
      .where('organisation_id', '=', organisationId)
      .where('seq', '>', afterSeq)
      .orderBy('seq')
      .limit(pageSize)
      .execute();
    yield* page;
    if (page.length < pageSize) return;
    afterSeq = page[page.length - 1]!.seq;
  }
}

/** The audit rows that froze these baselines (action "freeze"), by baseline id. */
export async function freezeRowsOf(db: Executor, organisationId: string): Promise<Map<string, AuditRow>> {
  const rows = await db
    .selectFrom('audit_log')
    .selectAll()
    .where('organisation_id', '=', organisationId)
    .where('entity_type', '=', 'baseline')
    .where('action', '=', 'freeze')
    .orderBy('seq')
    .execute();
  return new Map(rows.map((row) => [row.entity_id, row]));
}
