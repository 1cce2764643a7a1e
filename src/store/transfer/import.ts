/**
 * Import: a checked document stored in another database in one
 * transaction, refused when any of its ids is already there, and checked
 * again from the target's own rows before the commit; or nothing stored.
 */
import type { Kysely, Transaction } from 'kysely';
import { verifyAuditChain, type ChainVerdict } from '../audit.js';
import { verifyBaselineContent } from '../baseline-content.js';
import { writeTransaction } from '../transactions.js';
import { bumpMeterVersions } from '../data-versions.js';
import type { Database } from '../schema.js';
import { GLOBAL_ID_TABLES, TABLE_RULES } from './columns.js';
import { checkDocument } from './check-document.js';
import { mustVerify } from './check-integrity.js';
import {
  TRANSFER_TABLES,
  TransferInputError,
  compareKeys,
  type ExportDocument,
  type ExportRow,
  type OrganisationRecord,
  type TransferTable,
} from './document.js';

export interface ImportSummary {
  organisation: OrganisationRecord;
  rows: Record<TransferTable, number>;
  auditHead: { seq: number; hash: string };
}

/**
 * SQLite accepts at most 32,766 bound values in one statement (its default
 * SQLITE_MAX_VARIABLE_NUMBER since 3.32), PostgreSQL 65,535; rows are also
 * capped so a statement of large baseline documents stays moderate.
 */
const MAX_PARAMETERS = 32_766;
const MAX_ROWS_PER_INSERT = 500;

/**
 * Check the document, then store it in one transaction: refused when the
 * organisation (or any of its ids) is already in the target; checked again
 * after the inserts, from the target's own rows, before the commit.
 */
export async function importOrganisation(db: Kysely<Database>, input: unknown): Promise<ImportSummary> {
  const document = checkDocument(input);
  const { organisation, tables } = document;
  return writeTransaction(db, organisation.id, async (trx) => {
    await refuseExisting(trx, document);
    await trx.insertInto('organisations').values(organisation).execute();
    for (const table of TRANSFER_TABLES) await insertRows(trx, table, insertionOrder(table, tables[table]));
    // Data versions are not exported: the imported meters get fresh ones.
    for (const chunk of chunks(tables.meters, MAX_ROWS_PER_INSERT))
      await bumpMeterVersions(
        trx,
        chunk.map((row) => row.id as string),
      );
    await checkTarget(trx, document);
    const rows = {} as Record<TransferTable, number>;
    for (const table of TRANSFER_TABLES) rows[table] = tables[table].length;
    return { organisation, rows, auditHead: document.auditHead };
  });
}

async function refuseExisting(trx: Transaction<Database>, document: ExportDocument): Promise<void> {
  const { id } = document.organisation;
  const present = await trx.selectFrom('organisations').select('id').where('id', '=', id).executeTakeFirst();
  if (present) throw new TransferInputError(`organisation ${id} already exists in the target database`);
  for (const table of GLOBAL_ID_TABLES) {
    const ids = document.tables[table].map((row) => row.id as string);
    for (const chunk of chunks(ids, MAX_ROWS_PER_INSERT)) {
      const taken = await trx.selectFrom(table).select('id').where('id', 'in', chunk).executeTakeFirst();
      if (taken) throw new TransferInputError(`${table} id ${taken.id} already exists in the target database`);
    }
  }
}

/** A superseding baseline references an earlier version, so versions go in ascending order. */
function insertionOrder(table: TransferTable, rows: ExportRow[]): ExportRow[] {
  if (table !== 'baselines') return rows;
  return [...rows].sort((a, b) => (a.version as number) - (b.version as number) || compareKeys(a, b, ['id']));
}

function* chunks<T>(items: readonly T[], size: number): Generator<T[]> {
  for (let start = 0; start < items.length; start += size) yield items.slice(start, start + size);
}

async function insertRows(trx: Transaction<Database>, table: TransferTable, rows: readonly ExportRow[]): Promise<void> {
  const columns = Object.keys(TABLE_RULES[table].columns).length;
  const size = Math.min(MAX_ROWS_PER_INSERT, Math.floor(MAX_PARAMETERS / columns));
  // The rows were checked against the table's columns in checkDocument.
  for (const chunk of chunks(rows, size))
    await trx
      .insertInto(table)
      .values(chunk as never)
      .execute();
}

/** The target's own rows, read back inside the transaction: any mismatch rolls everything back. */
async function checkTarget(trx: Transaction<Database>, document: ExportDocument): Promise<void> {
  const { id } = document.organisation;
  const verdict: ChainVerdict = await verifyAuditChain(trx, id);
  if (!verdict.ok || verdict.headSeq !== document.auditHead.seq || verdict.headHash !== document.auditHead.hash) {
    const why = verdict.broken
      ? `breaks at seq ${verdict.broken.seq}: ${verdict.broken.reason}`
      : `ends at seq ${verdict.headSeq} with hash ${verdict.headHash}`;
    throw new Error(`after the import the target's audit chain of ${id} ${why}; nothing was stored`);
  }
  const baselines = await trx.selectFrom('baselines').selectAll().where('organisation_id', '=', id).execute();
  if (baselines.length !== document.tables.baselines.length)
    throw new Error(
      `after the import the target holds ${baselines.length} baselines of ${id}, not ${document.tables.baselines.length}; nothing was stored`,
    );
  for (const row of baselines) {
    if (mustVerify(row as unknown as ExportRow) && !verifyBaselineContent(row)) {
      throw new Error(
        `after the import baseline ${row.id} in the target does not match its content hash; nothing was stored`,
      );
    }
  }
}
