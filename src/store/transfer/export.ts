/**
 * Export: every row of one organisation, exactly as stored, read on one
 * snapshot and checked exactly as an import would check it.
 */
import type { Kysely, Transaction } from 'kysely';
import { GENESIS_HASH } from '../audit.js';
import { readSnapshot } from '../transactions.js';
import type { Database } from '../schema.js';
import { TABLE_RULES } from './columns.js';
import { checkDocument } from './check-document.js';
import {
  EXPORT_FORMAT,
  EXPORT_VERSION,
  TRANSFER_TABLES,
  TransferInputError,
  compareKeys,
  type ExportDocument,
  type ExportRow,
  type TransferTable,
} from './document.js';

/**
 * The organisation's document, read in one transaction (a snapshot on
 * PostgreSQL) and checked exactly as an import would check it, so a source
 * whose audit chain or frozen baselines no longer verify is not exported.
 */
export async function exportOrganisation(
  db: Kysely<Database>,
  organisationId: string,
  exportedAt: string,
): Promise<ExportDocument> {
  const document = await readSnapshot(db, (trx) => readOrganisation(trx, organisationId, exportedAt));
  try {
    return checkDocument(document);
  } catch (error) {
    if (error instanceof TransferInputError)
      throw new TransferInputError(`organisation ${organisationId} cannot be exported as stored: ${error.message}`);
    throw error;
  }
}

async function readOrganisation(
  trx: Transaction<Database>,
  organisationId: string,
  exportedAt: string,
): Promise<ExportDocument> {
  const organisation = await trx
    .selectFrom('organisations')
    .selectAll()
    .where('id', '=', organisationId)
    .executeTakeFirst();
  if (!organisation) throw new TransferInputError(`no organisation ${organisationId}`);
  const stations = trx.selectFrom('weather_stations').select('id').where('organisation_id', '=', organisationId);
  const meters = trx.selectFrom('meters').select('id').where('organisation_id', '=', organisationId);
  const raw: Record<TransferTable, unknown[]> = {
    api_keys: await trx.selectFrom('api_keys').selectAll().where('organisation_id', '=', organisationId).execute(),
    weather_stations: await trx
      .selectFrom('weather_stations')
      .selectAll()
      .where('organisation_id', '=', organisationId)
      .execute(),
    weather_observations: await trx
      .selectFrom('weather_observations')
      .selectAll()
      .where('station_id', 'in', stations)
      .execute(),
    facilities: await trx.selectFrom('facilities').selectAll().where('organisation_id', '=', organisationId).execute(),
    meters: await trx.selectFrom('meters').selectAll().where('organisation_id', '=', organisationId).execute(),
    readings: await trx.selectFrom('readings').selectAll().where('meter_id', 'in', meters).execute(),
    normal_years: await trx.selectFrom('normal_years').selectAll().where('station_id', 'in', stations).execute(),
    contracts: await trx.selectFrom('contracts').selectAll().where('organisation_id', '=', organisationId).execute(),
    rates: await trx.selectFrom('rates').selectAll().where('meter_id', 'in', meters).execute(),
    adjustments: await trx
      .selectFrom('adjustments')
      .selectAll()
      .where('organisation_id', '=', organisationId)
      .execute(),
    baselines: await trx.selectFrom('baselines').selectAll().where('organisation_id', '=', organisationId).execute(),
    statements: await trx.selectFrom('statements').selectAll().where('organisation_id', '=', organisationId).execute(),
    statement_copies: await trx
      .selectFrom('statement_copies')
      .selectAll()
      .where('organisation_id', '=', organisationId)
      .execute(),
    variables: await trx.selectFrom('variables').selectAll().where('organisation_id', '=', organisationId).execute(),
    variable_values: await trx
      .selectFrom('variable_values')
      .selectAll()
      .where(
        'variable_id',
        'in',
        trx.selectFrom('variables').select('id').where('organisation_id', '=', organisationId),
      )
      .execute(),
    facility_calendars: await trx
      .selectFrom('facility_calendars')
      .selectAll()
      .where('organisation_id', '=', organisationId)
      .execute(),
    audit_log: await trx.selectFrom('audit_log').selectAll().where('organisation_id', '=', organisationId).execute(),
  };
  const tables = {} as Record<TransferTable, ExportRow[]>;
  for (const table of TRANSFER_TABLES) {
    // Sorted here, not by the database: text order depends on PostgreSQL's collation.
    tables[table] = (raw[table] as ExportRow[]).sort((a, b) => compareKeys(a, b, TABLE_RULES[table].key));
  }
  const last = tables.audit_log.at(-1);
  return {
    format: EXPORT_FORMAT,
    version: EXPORT_VERSION,
    exportedAt,
    organisation: { id: organisation.id, name: organisation.name, created_at: organisation.created_at },
    auditHead: last ? { seq: last.seq as number, hash: last.hash as string } : { seq: 0, hash: GENESIS_HASH },
    tables,
  };
}
