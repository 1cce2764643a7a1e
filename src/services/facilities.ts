/** Facilities: the buildings or sites a contract covers. */
import { newId } from '../store/ids.js';
import { notFound } from '../domain/errors.js';
import { audit, inTransaction, type Executor, type ServiceContext } from './context.js';
import { oldestFirstPage, PAGE_SIZES, type PageInfo, type PageRequest } from './paging.js';

export interface Facility {
  id: string;
  name: string;
  address: string | null;
  floorArea: number | null;
  createdAt: string;
}

type FacilityRow = { id: string; name: string; address: string | null; floor_area: number | null; created_at: string };

export function toFacility(row: FacilityRow): Facility {
  return { id: row.id, name: row.name, address: row.address, floorArea: row.floor_area, createdAt: row.created_at };
}

export async function createFacility(
  ctx: ServiceContext,
  input: { name: string; address?: string | null; floorArea?: number | null },
): Promise<Facility> {
  const row = {
    id: newId('fac'),
    organisation_id: ctx.principal.organisationId,
    name: input.name,
    address: input.address ?? null,
    floor_area: input.floorArea ?? null,
    created_at: ctx.now,
  };
  return inTransaction(ctx, async (trx) => {
    await trx.insertInto('facilities').values(row).execute();
    const facility = toFacility(row);
    await audit(trx, ctx, { action: 'create', entityType: 'facility', entityId: row.id, after: facility });
    return facility;
  });
}

/** The organisation's facility, or a 404 (another organisation's id included). */
export async function getFacilityRow(db: Executor, organisationId: string, id: string) {
  const row = await db
    .selectFrom('facilities')
    .selectAll()
    .where('id', '=', id)
    .where('organisation_id', '=', organisationId)
    .executeTakeFirst();
  if (!row) throw notFound('facility', id);
  return row;
}

/** The organisation's facilities, oldest first, a page at a time. */
export async function listFacilities(
  db: Executor,
  organisationId: string,
  request: PageRequest = { limit: PAGE_SIZES.records.default },
): Promise<{ facilities: Facility[] } & PageInfo> {
  const { rows, page } = await oldestFirstPage(
    db.selectFrom('facilities').selectAll().where('organisation_id', '=', organisationId),
    request,
    'facilities',
  );
  return { facilities: rows.map(toFacility), ...page };
}
