/**
 * API keys of an organisation, managed by its admins over HTTP or by the
 * operator from the command line. The token (mvl_<id>_<secret>) is returned
 * once, by create; only the secret's hash is stored, and neither the token
 * nor the hash ever goes into the audit trail.
 */
import type { Kysely } from 'kysely';
import { insertApiKey, publicKey } from '../store/api-keys.js';
import { appendAudit } from '../store/audit.js';
import { lockOrganisation } from '../store/transactions.js';
import type { ApiKeyRow, Database } from '../store/schema.js';
import { ROLE_PERMISSIONS, type Permission, type Principal, type Role } from '../domain/principal.js';
import { notFound, DomainError } from '../domain/errors.js';
import { audit, inTransaction, type Executor, type ServiceContext, type Tx } from './context.js';
import { oldestFirstPage, PAGE_SIZES, type PageInfo, type PageRequest } from './paging.js';

export type ApiKeyView = ReturnType<typeof publicKey>;

export async function createApiKey(
  ctx: ServiceContext,
  input: { name: string; role: Role },
): Promise<{ key: ApiKeyView; token: string }> {
  return inTransaction(ctx, async (trx) => {
    const { row, token } = await insertApiKey(trx, {
      organisationId: ctx.principal.organisationId,
      name: input.name,
      role: input.role,
      at: ctx.now,
    });
    const key = publicKey(row);
    await audit(trx, ctx, { action: 'create', entityType: 'api-key', entityId: row.id, after: key });
    return { key, token };
  });
}

/** The organisation's API keys (public parts only), oldest first, a page at a time. */
export async function listApiKeys(
  db: Executor,
  organisationId: string,
  request: PageRequest = { limit: PAGE_SIZES.records.default },
): Promise<{ keys: ApiKeyView[] } & PageInfo> {
  const { rows, page } = await oldestFirstPage(
    db.selectFrom('api_keys').selectAll().where('organisation_id', '=', organisationId),
    request,
    'keys',
  );
  return { keys: rows.map(publicKey), ...page };
}

/**
 * Revoke one of the organisation's keys. The key making the request cannot
 * revoke itself, so an admin cannot lock the organisation out by accident.
 * Revoking a revoked key changes nothing and answers the key as it is.
 */
export async function revokeApiKey(ctx: ServiceContext, id: string): Promise<ApiKeyView> {
  return inTransaction(ctx, async (trx) => {
    const row = await trx
      .selectFrom('api_keys')
      .selectAll()
      .where('id', '=', id)
      .where('organisation_id', '=', ctx.principal.organisationId)
      .executeTakeFirst();
    if (!row) throw notFound('API key', id);
    if (row.id === ctx.principal.keyId) {
      throw new DomainError(
        'conflict',
        `API key ${id} is the key making this request; revoke it with another admin key`,
        [{ field: 'id', message: 'is the key in use' }],
      );
    }
    if (row.revoked_at !== null) return publicKey(row);
    const revoked = await markRevoked(trx, row, ctx.now);
    await audit(trx, ctx, {
      action: 'revoke',
      entityType: 'api-key',
      entityId: row.id,
      before: publicKey(row),
      after: revoked,
    });
    return revoked;
  });
}

async function markRevoked(trx: Tx, row: ApiKeyRow, at: string): Promise<ApiKeyView> {
  await trx.updateTable('api_keys').set({ revoked_at: at }).where('id', '=', row.id).execute();
  return publicKey({ ...row, revoked_at: at });
}

/** A key with its organisation, as the operator's listing shows it. */
export interface OperatorKeyView extends ApiKeyView {
  organisationId: string;
  organisationName: string;
}

/** Every key (or one organisation's), for the operator's command line. */
export async function listKeysForOperator(db: Kysely<Database>, organisationId?: string): Promise<OperatorKeyView[]> {
  let query = db
    .selectFrom('api_keys')
    .innerJoin('organisations', 'organisations.id', 'api_keys.organisation_id')
    .selectAll('api_keys')
    .select('organisations.name as organisation_name');
  if (organisationId !== undefined) query = query.where('api_keys.organisation_id', '=', organisationId);
  const rows = await query
    .orderBy('api_keys.organisation_id')
    .orderBy('api_keys.created_at')
    .orderBy('api_keys.id')
    .execute();
  return rows.map((row) => ({
    ...publicKey(row),
    organisationId: row.organisation_id,
    organisationName: row.organisation_name,
  }));
}

export interface OperatorRevoke {
  outcome: 'revoked' | 'already-revoked';
  key: OperatorKeyView;
}

/**
 * The operator revokes any key, by id, with the actor "system": the way back
 * in when an organisation has lost its last admin key. An unknown id is a
 * not-found DomainError.
 */
export async function revokeKeyAsOperator(db: Kysely<Database>, id: string, at: string): Promise<OperatorRevoke> {
  return db
    .transaction()
    .setAccessMode('read write')
    .execute(async (trx) => {
      const found = await trx.selectFrom('api_keys').select('organisation_id').where('id', '=', id).executeTakeFirst();
      if (!found) throw new DomainError('not-found', `no API key ${id}`);
      await lockOrganisation(trx, found.organisation_id);
      // Read again under the lock: another instance may have revoked it meanwhile.
      const row = await trx.selectFrom('api_keys').selectAll().where('id', '=', id).executeTakeFirstOrThrow();
      const organisation = await trx
        .selectFrom('organisations')
        .select('name')
        .where('id', '=', row.organisation_id)
        .executeTakeFirstOrThrow();
      const withOrganisation = (key: ApiKeyView): OperatorKeyView => ({
        ...key,
        organisationId: row.organisation_id,
        organisationName: organisation.name,
      });
      if (row.revoked_at !== null) return { outcome: 'already-revoked', key: withOrganisation(publicKey(row)) };
      const revoked = await markRevoked(trx, row, at);
      await appendAudit(trx, {
        organisationId: row.organisation_id,
        actor: 'system',
        at,
        action: 'revoke',
        entityType: 'api-key',
        entityId: row.id,
        before: publicKey(row),
        after: revoked,
      });
      return { outcome: 'revoked', key: withOrganisation(revoked) };
    });
}

/** The calling key as it may see itself (never its secret): what GET /v1/me answers. */
export interface CallerView {
  key: { id: string; name: string; role: Role };
  permissions: Permission[];
  organisation: { id: string; name: string };
}

/** The calling key's name, role, permissions (ROLE_PERMISSIONS) and organisation, so a client shows only what the key may do. */
export async function describeCaller(db: Executor, principal: Principal): Promise<CallerView> {
  const key = await db
    .selectFrom('api_keys')
    .select(['id', 'name', 'role'])
    .where('id', '=', principal.keyId)
    .where('organisation_id', '=', principal.organisationId)
    .executeTakeFirst();
  const organisation = await db
    .selectFrom('organisations')
    .select(['id', 'name'])
    .where('id', '=', principal.organisationId)
    .executeTakeFirst();
  if (!key || !organisation) throw notFound('api key', principal.keyId);
  return {
    key: { id: key.id, name: key.name, role: key.role as Role },
    permissions: [...ROLE_PERMISSIONS[principal.role]],
    organisation,
  };
}
