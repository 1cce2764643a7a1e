/**
 * What a baseline was fitted on and what was allowed when it was frozen, and
 * the engineer's ± of a non-routine adjustment:
 * - baselines.temperature_form: 'daily' (day-resolved) or 'mean'. Every
 *   baseline stored before the day-resolved form existed was fitted in the
 *   mean form, which is the default; a row whose fit document already names
 *   the day-resolved form (written by a build that knew it) says so.
 * - baselines.short_baseline_override, baselines.extrapolation_override: the
 *   reasons given at freeze for projecting from a baseline shorter than a
 *   full cycle of seasons, and beyond the extrapolation limit (null: none).
 * - adjustments.uncertainty: the standard uncertainty of the adjustment's
 *   total, in the meter's unit (null: none stated).
 * One column per statement: SQLite adds one column at a time.
 */
import { sql, type Kysely } from 'kysely';

export async function up(db: Kysely<unknown>): Promise<void> {
  await db.schema
    .alterTable('baselines')
    .addColumn('temperature_form', 'text', (c) => c.notNull().defaultTo('mean'))
    .execute();
  await db.schema.alterTable('baselines').addColumn('short_baseline_override', 'text').execute();
  await db.schema.alterTable('baselines').addColumn('extrapolation_override', 'text').execute();
  await db.schema.alterTable('adjustments').addColumn('uncertainty', 'double precision').execute();
  // Stored fit documents are canonical JSON (no spaces), so the form reads as this exact text.
  await sql`update baselines set temperature_form = 'daily' where document_json like ${'%"temperatureForm":"daily"%'}`.execute(
    db,
  );
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await db.schema.alterTable('adjustments').dropColumn('uncertainty').execute();
  for (const column of ['extrapolation_override', 'short_baseline_override', 'temperature_form']) {
    await db.schema.alterTable('baselines').dropColumn(column).execute();
  }
}
