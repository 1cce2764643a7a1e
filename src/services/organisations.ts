/**
 * Organisations and their keys, outside any request: the keys CLI and the
 * bootstrap key of a new database use these. Every change is audited with
 * the actor "system".
 */
import type { Kysely, Transaction } from 'kysely';
import type { Database } from '../store/schema.js';
import type { Role } from '../domain/principal.js';
import { newId } from '../store/ids.js';
import { writeTransaction } from '../store/transactions.js';
import { appendAudit } from '../store/audit.js';
import { insertApiKey, publicKey } from '../store/api-keys.js';

type NewKeyInput = { organisationId: string; name: string; role: Role; at: string; actor?: string; token?: string };

export async function createOrganisation(
  db: Kysely<Database>,
  name: string,
  at: string,
): Promise<{ id: string; name: string }> {
  const id = newId('org');
  return writeTransaction(db, id, (trx) => insertOrganisation(trx, id, name, at));
}

export async function createKey(
  db: Kysely<Database>,
  input: NewKeyInput,
): Promise<{ token: string; key: ReturnType<typeof publicKey> }> {
  return writeTransaction(db, input.organisationId, (trx) => insertKey(trx, input));
}

async function insertOrganisation(
  trx: Transaction<Database>,
  id: string,
  name: string,
  at: string,
): Promise<{ id: string; name: string }> {
  await trx.insertInto('organisations').values({ id, name, created_at: at }).execute();
  await appendAudit(trx, {
    organisationId: id,
    actor: 'system',
    at,
    action: 'create',
    entityType: 'organisation',
    entityId: id,
    after: { id, name },
  });
  return { id, name };
}

async function insertKey(
  trx: Transaction<Database>,
  input: NewKeyInput,
): Promise<{ token: string; key: ReturnType<typeof publicKey> }> {
  const { row, token } = await insertApiKey(trx, input);
  const key = publicKey(row);
  await appendAudit(trx, {
    organisationId: input.organisationId,
    actor: input.actor ?? 'system',
    at: input.at,
    action: 'create',
    entityType: 'api-key',
    entityId: row.id,
    after: key,
  });
  return { token, key };
}

/** Lock name under which instances starting together agree who bootstraps. */
const BOOTSTRAP_LOCK = 'mvledger bootstrap';

/**
 * A new, empty database with MVLEDGER_BOOTSTRAP_KEY set gets one organisation
 * and that key as its admin key, so a container can start ready to use.
 * Returns true when it did so.
 */
export async function bootstrapIfEmpty(
  db: Kysely<Database>,
  bootstrapKey: string | undefined,
  at: string,
  name = 'Bootstrap organisation',
): Promise<boolean> {
  if (!bootstrapKey) return false;
  // One transaction under one lock: instances started together on an empty
  // database see each other's organisation, and exactly one bootstraps.
  return writeTransaction(db, BOOTSTRAP_LOCK, async (trx) => {
    const any = await trx.selectFrom('organisations').select('id').limit(1).executeTakeFirst();
    if (any) return false;
    const id = newId('org');
    await insertOrganisation(trx, id, name, at);
    await insertKey(trx, { organisationId: id, name: 'bootstrap admin', role: 'admin', at, token: bootstrapKey });
    return true;
  });
}
