/**
 * Issued savings statements and the contract's identification:
 * - contracts gain their reference, the parties, the M&V plan's reference
 *   and IPMVP option, and the confidence level that governs every ± of
 *   their reports (0.9 for contracts stored before it existed).
 * - statements: one row per issued statement (its request, the audit head
 *   it rests on, and each step of its approval workflow with who and when).
 * - statement_copies: the stored bytes of each copy of a statement (the
 *   issued copy, then one per workflow step), JSON, CSV and HTML, each with
 *   its SHA-256. Never updated: a new step adds a copy.
 * One column per statement: SQLite adds one column at a time.
 */
import type { Kysely } from 'kysely';

export async function up(db: Kysely<unknown>): Promise<void> {
  await db.schema.alterTable('contracts').addColumn('reference', 'text').execute();
  await db.schema
    .alterTable('contracts')
    .addColumn('parties_json', 'text', (c) => c.notNull().defaultTo('[]'))
    .execute();
  await db.schema.alterTable('contracts').addColumn('mv_plan_reference', 'text').execute();
  await db.schema.alterTable('contracts').addColumn('mv_option', 'text').execute();
  await db.schema
    .alterTable('contracts')
    .addColumn('confidence', 'double precision', (c) => c.notNull().defaultTo(0.9))
    .execute();

  await db.schema
    .createTable('statements')
    .addColumn('id', 'text', (c) => c.primaryKey())
    .addColumn('organisation_id', 'text', (c) => c.notNull().references('organisations.id'))
    .addColumn('status', 'text', (c) => c.notNull())
    .addColumn('request_json', 'text', (c) => c.notNull())
    .addColumn('window_from', 'text', (c) => c.notNull())
    .addColumn('window_to', 'text', (c) => c.notNull())
    .addColumn('window_kind', 'text', (c) => c.notNull())
    .addColumn('window_label', 'text', (c) => c.notNull())
    .addColumn('facility_id', 'text')
    .addColumn('confidence', 'double precision', (c) => c.notNull())
    .addColumn('note', 'text')
    .addColumn('audit_seq', 'integer', (c) => c.notNull())
    .addColumn('audit_hash', 'text', (c) => c.notNull())
    .addColumn('report_hash', 'text', (c) => c.notNull())
    .addColumn('data_through', 'text')
    .addColumn('prepared_by', 'text', (c) => c.notNull())
    .addColumn('prepared_at', 'text', (c) => c.notNull())
    .addColumn('approved_by', 'text')
    .addColumn('approved_at', 'text')
    .addColumn('rejected_by', 'text')
    .addColumn('rejected_at', 'text')
    .addColumn('rejection_reason', 'text')
    .addColumn('voided_by', 'text')
    .addColumn('voided_at', 'text')
    .addColumn('void_reason', 'text')
    .addColumn('replaced_by', 'text')
    .execute();
  await db.schema
    .createIndex('statements_organisation')
    .on('statements')
    .columns(['organisation_id', 'prepared_at'])
    .execute();

  await db.schema
    .createTable('statement_copies')
    .addColumn('statement_id', 'text', (c) => c.notNull().references('statements.id'))
    .addColumn('copy', 'integer', (c) => c.notNull())
    .addColumn('organisation_id', 'text', (c) => c.notNull().references('organisations.id'))
    .addColumn('kind', 'text', (c) => c.notNull())
    .addColumn('created_at', 'text', (c) => c.notNull())
    .addColumn('json_body', 'text', (c) => c.notNull())
    .addColumn('csv_body', 'text', (c) => c.notNull())
    .addColumn('html_body', 'text', (c) => c.notNull())
    .addColumn('json_hash', 'text', (c) => c.notNull())
    .addColumn('csv_hash', 'text', (c) => c.notNull())
    .addColumn('html_hash', 'text', (c) => c.notNull())
    .addPrimaryKeyConstraint('statement_copies_pk', ['statement_id', 'copy'])
    .execute();
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await db.schema.dropTable('statement_copies').execute();
  await db.schema.dropTable('statements').execute();
  for (const column of ['confidence', 'mv_option', 'mv_plan_reference', 'parties_json', 'reference']) {
    await db.schema.alterTable('contracts').dropColumn(column).execute();
  }
}
