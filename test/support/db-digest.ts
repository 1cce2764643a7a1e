/**
 * A digest of every table's full contents, to show that a rejected request
 * stored nothing: take it before, send the bad request, compare after.
 */
import { sql, type Kysely } from 'kysely';
import { createHash } from 'node:crypto';
import type { Database } from '../../src/store/schema.js';

const TABLES = [
  'organisations',
  'api_keys',
  'weather_stations',
  'weather_observations',
  'facilities',
  'meters',
  'readings',
  'baselines',
  'audit_log',
  'idempotency_keys',
  'adjustments',
  'rates',
  'contracts',
  'normal_years',
  'statements',
  'statement_copies',
  'meter_data_versions',
  'variables',
  'variable_values',
  'facility_calendars',
  'audit_checkpoints',
  'frozen_models',
] as const;

export async function databaseDigest(db: Kysely<Database>): Promise<string> {
  const hash = createHash('sha256');
  for (const table of TABLES) {
    const rows = await sql<Record<string, unknown>>`select * from ${sql.table(table)} order by 1, 2`.execute(db);
    hash.update(`${table}\n${JSON.stringify(rows.rows)}\n`);
  }
  return hash.digest('hex');
}
