/**
 * Checking a whole document before anything is stored: its envelope, the
 * rows of each table, the rules the API checks, and its integrity.
 */
import { INTEGER, ORGANISATION_RULE, TEXT } from './columns.js';
import { checkCell, checkRow, checkTable, fail, isObject, shown } from './check-rows.js';
import { checkAuditTrail, checkBaselineHashes, checkReferences, checkStatementCopies } from './check-integrity.js';
import { checkKeysIssuedOnRecord } from './check-key-audit.js';
import { firstRuleBroken } from './rules.js';
import {
  EXPORT_FORMAT,
  EXPORT_VERSION,
  READABLE_VERSIONS,
  TABLES_SINCE_VERSION_2,
  TABLES_SINCE_VERSION_4,
  TABLES_SINCE_VERSION_6,
  TRANSFER_TABLES,
  TransferInputError,
  type ExportDocument,
  type ExportRow,
  type OrganisationRecord,
  type TransferTable,
} from './document.js';

/** The document if it is a well-formed, self-consistent export; else a TransferInputError naming the place. */
export function checkDocument(value: unknown): ExportDocument {
  if (!isObject(value)) fail('document', `must be a JSON object, got ${shown(value)}`);
  if (value.format !== EXPORT_FORMAT)
    fail('format', `must be ${JSON.stringify(EXPORT_FORMAT)}, got ${shown(value.format)}`);
  if (!(READABLE_VERSIONS as readonly unknown[]).includes(value.version)) {
    fail(
      'version',
      `this mvledger reads versions ${READABLE_VERSIONS.slice(0, -1).join(', ')} and ${READABLE_VERSIONS.at(-1)}, got ${shown(value.version)}`,
    );
  }
  if (typeof value.exportedAt !== 'string') fail('exportedAt', `must be text, got ${shown(value.exportedAt)}`);
  const version = value.version as number;
  const organisation = checkRow(
    'organisation',
    value.organisation,
    ORGANISATION_RULE,
    null,
    version,
  ) as unknown as OrganisationRecord;
  const head = value.auditHead;
  if (!isObject(head)) fail('auditHead', `must be an object { seq, hash }, got ${shown(head)}`);
  checkCell('auditHead.seq', head.seq, INTEGER);
  checkCell('auditHead.hash', head.hash, TEXT);
  if (!isObject(value.tables)) fail('tables', `must be an object of tables, got ${shown(value.tables)}`);
  const later: readonly string[] = [
    ...(version < 2 ? TABLES_SINCE_VERSION_2 : []),
    ...(version < 4 ? TABLES_SINCE_VERSION_4 : []),
    ...(version < 6 ? TABLES_SINCE_VERSION_6 : []),
  ];
  const known: readonly string[] = TRANSFER_TABLES.filter((t) => !later.includes(t));
  for (const name of Object.keys(value.tables)) {
    if (!known.includes(name)) fail(`tables.${name}`, `not a table of format version ${shown(value.version)}`);
  }
  const tables = {} as Record<TransferTable, ExportRow[]>;
  for (const table of TRANSFER_TABLES)
    tables[table] = known.includes(table) ? checkTable(table, value.tables[table], organisation.id, version) : [];
  checkReferences(tables);
  const broken = firstRuleBroken(tables);
  if (broken) throw new TransferInputError(broken);
  const auditHead = { seq: head.seq as number, hash: head.hash as string };
  checkAuditTrail(organisation.id, tables.audit_log, auditHead);
  checkKeysIssuedOnRecord(tables.api_keys, tables.audit_log);
  checkBaselineHashes(tables.baselines);
  checkStatementCopies(tables.statement_copies);
  return {
    format: EXPORT_FORMAT,
    version: EXPORT_VERSION,
    exportedAt: value.exportedAt,
    organisation,
    auditHead,
    tables,
  };
}
