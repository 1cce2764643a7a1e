/**
 * What holds a document together: references stay inside it, baseline
 * versions and supersessions are consistent, the audit chain recomputes to
 * the stated head, frozen baselines and statement copies match their hashes.
 */
import { sha256Hex } from '../../lib/canonical-json.js';
import { verifyBaselineContent } from '../baseline-content.js';
import { verifyAuditRows } from '../audit.js';
import type { AuditRow, BaselineRow } from '../schema.js';
import { fail, shown } from './check-rows.js';
import type { Cell, ExportRow, TransferTable } from './document.js';

/** Every reference points at a row of the same document, so the import never leans on the target's other rows. */
export function checkReferences(tables: Record<TransferTable, ExportRow[]>): void {
  const ids = (table: TransferTable) => new Set<Cell | undefined>(tables[table].map((row) => row.id));
  const stations = ids('weather_stations');
  const facilities = ids('facilities');
  const meters = ids('meters');
  const refer = (table: TransferTable, column: string, targets: Set<Cell | undefined>, what: string) => {
    tables[table].forEach((row, index) => {
      if (!targets.has(row[column]))
        fail(`tables.${table}[${index}].${column}`, `${shown(row[column])} is not a ${what} in the document`);
    });
  };
  refer('weather_observations', 'station_id', stations, 'weather station');
  refer('meters', 'facility_id', facilities, 'facility');
  refer('meters', 'weather_station_id', stations, 'weather station');
  refer('readings', 'meter_id', meters, 'meter');
  refer('baselines', 'meter_id', meters, 'meter');
  refer('normal_years', 'station_id', stations, 'weather station');
  refer('contracts', 'facility_id', facilities, 'facility');
  refer('rates', 'meter_id', meters, 'meter');
  refer('adjustments', 'meter_id', meters, 'meter');
  refer('statement_copies', 'statement_id', ids('statements'), 'statement');
  refer('variables', 'facility_id', facilities, 'facility');
  tables.variables.forEach((row, index) => {
    if (row.meter_id !== null && !meters.has(row.meter_id))
      fail(`tables.variables[${index}].meter_id`, `${shown(row.meter_id)} is not a meter in the document`);
  });
  refer('variable_values', 'variable_id', ids('variables'), 'variable');
  refer('facility_calendars', 'facility_id', facilities, 'facility');

  const baselines = new Map(tables.baselines.map((row) => [row.id, row]));
  const versions = new Set<string>();
  const frozenMeters = new Set<Cell>();
  tables.baselines.forEach((row, index) => {
    const path = `tables.baselines[${index}]`;
    const version = JSON.stringify([row.meter_id, row.version]);
    if (versions.has(version)) fail(`${path}.version`, `meter ${row.meter_id} has a second version ${row.version}`);
    versions.add(version);
    if (row.status === 'frozen') {
      if (frozenMeters.has(row.meter_id!)) fail(`${path}.status`, `meter ${row.meter_id} has a second frozen baseline`);
      frozenMeters.add(row.meter_id!);
    }
    if (row.supersedes_id === null) return;
    const older = baselines.get(row.supersedes_id!);
    if (!older || older.meter_id !== row.meter_id || (older.version as number) >= (row.version as number)) {
      fail(
        `${path}.supersedes_id`,
        `${shown(row.supersedes_id)} is not an earlier version of meter ${row.meter_id}'s baseline in the document`,
      );
    }
  });
}

export function checkAuditTrail(
  organisationId: string,
  rows: readonly ExportRow[],
  head: { seq: number; hash: string },
): void {
  const verdict = verifyAuditRows(organisationId, rows as unknown as AuditRow[]);
  if (!verdict.ok) {
    const index = rows.findIndex((row) => row.seq === verdict.broken!.seq);
    fail(
      `tables.audit_log[${index}]`,
      `the audit chain breaks at seq ${verdict.broken!.seq}: ${verdict.broken!.reason}`,
    );
  }
  if (verdict.headSeq !== head.seq || verdict.headHash !== head.hash) {
    fail(
      'auditHead',
      `the audit chain ends at seq ${verdict.headSeq} with hash ${verdict.headHash}, not at the stated seq ${head.seq} with hash ${head.hash}`,
    );
  }
}

/** Frozen and superseded baselines (and any draft that claims a hash) must still match their content hash. */
export function mustVerify(row: ExportRow): boolean {
  return row.status !== 'draft' || row.content_hash !== null;
}

export function checkBaselineHashes(rows: readonly ExportRow[]): void {
  rows.forEach((row, index) => {
    if (mustVerify(row) && !verifyBaselineContent(row as unknown as BaselineRow)) {
      fail(
        `tables.baselines[${index}]`,
        `baseline ${row.id} (${row.status}) does not match its content hash ${shown(row.content_hash)}`,
      );
    }
  });
}

/** Every stored statement copy still matches its content hashes: the bytes a statement was filed with travel unchanged. */
export function checkStatementCopies(rows: readonly ExportRow[]): void {
  rows.forEach((row, index) => {
    for (const format of ['json', 'csv', 'html'] as const) {
      if (sha256Hex(row[`${format}_body`] as string) !== row[`${format}_hash`])
        fail(
          `tables.statement_copies[${index}].${format}_body`,
          `statement ${row.statement_id} copy ${row.copy} does not match its ${format} content hash`,
        );
    }
  });
}
