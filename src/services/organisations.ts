/**
 * Organisations and their keys, outside any request: the keys CLI and the
 * bootstrap key of a new database use these. Every change is audited with
 * the actor "system".
 */
import type { Kysely } from 'kysely';
import type { Database, Role } from '../store/schema.js';
import { newId } from '../store/ids.js';
import { writeTransaction } from '../store/connect.js';
import { appendAudit } from '../store/audit.js';
import { insertApiKey, publicKey } from '../store/api-keys.js';

export async function createOrganisation(db: Kysely<Database>, name: string, at: string): Promise<{ id: string; name: string }> {
  const row = { id: newId('org'), name, created_at: at };
  return writeTransaction(db, row.id, async (trx) => {
    await trx.insertInto('organisations').values(row).execute();
    await appendAudit(trx, { organisationId: row.id, actor: 'system', at, action: 'create', entityType: 'organisation', entityId: row.id, after: { id: row.id, name } });
    return { id: row.id, name };
  });
}

export async function createKey(
  db: Kysely<Database>,
  input: { organisationId: string; name: string; role: Role; at: string; actor?: string; token?: string },
): Promise<{ token: string; key: ReturnType<typeof publicKey> }> {
  return writeTransaction(db, input.organisationId, async (trx) => {
    const { row, token } = await insertApiKey(trx, input);
    const key = publicKey(row);
    await appendAudit(trx, { organisationId: input.organisationId, actor: input.actor ?? 'system', at: input.at, action: 'create', entityType: 'api-key', entityId: row.id, after: key });
    return { token, key };
  });
}

/**
 * A new, empty database with MVLEDGER_BOOTSTRAP_KEY set gets one organisation
 * and that key as its admin key, so a container can start ready to use.
 * Returns true when it did so.
 */
export async function bootstrapIfEmpty(db: Kysely<Database>, bootstrapKey: string | undefined, at: string): Promise<boolean> {
  if (!bootstrapKey) return false;
  const any = await db.selectFrom('organisations').select('id').limit(1).executeTakeFirst();
  if (any) return false;
  const organisation = await createOrganisation(db, 'Bootstrap organisation', at);
  await createKey(db, { organisationId: organisation.id, name: 'bootstrap admin', role: 'admin', at, token: bootstrapKey });
  return true;
}
