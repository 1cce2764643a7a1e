/** Looking an organisation up by id, for callers outside a request (the command line). */
import type { Kysely } from 'kysely';
import type { Database } from './schema.js';

/** The organisation's id and name, or undefined when the database holds no such organisation. */
export async function findOrganisation(
  db: Kysely<Database>,
  organisationId: string,
): Promise<{ id: string; name: string } | undefined> {
  return db.selectFrom('organisations').select(['id', 'name']).where('id', '=', organisationId).executeTakeFirst();
}
