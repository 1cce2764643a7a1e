/**
 * Signed audit checkpoints: an organisation's audit head (sequence number and
 * hash) signed with the service's Ed25519 checkpoint key, which is held
 * outside the database (src/lib/checkpoint-signature.ts). One row per signed
 * head. The signature is what proves the trail; the row is only where it is
 * kept, so a row edited here fails its own signature check.
 */
import type { Kysely } from 'kysely';

// eslint-disable-next-line @typescript-eslint/no-explicit-any
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('audit_checkpoints')
    .addColumn('organisation_id', 'text', (c) => c.notNull().references('organisations.id'))
    .addColumn('seq', 'integer', (c) => c.notNull())
    .addColumn('head_hash', 'text', (c) => c.notNull())
    .addColumn('signed_at', 'text', (c) => c.notNull())
    .addColumn('key_id', 'text', (c) => c.notNull())
    .addColumn('signature', 'text', (c) => c.notNull())
    /** What made it: 'interval' (the periodic signer), 'statement' (a statement issued) or 'request' (asked for through the API). */
    .addColumn('reason', 'text', (c) => c.notNull())
    .addPrimaryKeyConstraint('audit_checkpoints_pk', ['organisation_id', 'seq', 'key_id'])
    .execute();
}

// eslint-disable-next-line @typescript-eslint/no-explicit-any
export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('audit_checkpoints').execute();
}
