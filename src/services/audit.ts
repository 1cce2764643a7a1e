/**
 * Reading the audit trail back: an organisation sees its own rows in
 * sequence order and checks that its own chain is intact.
 */
import { isIsoDate } from '../engine/index.js';
import { listAudit, verifyAuditChain, type ChainVerdict } from '../store/audit.js';
import type { AuditRow } from '../store/schema.js';
import type { Executor } from './context.js';
import { replayAuditTrail, type ReplayVerdict } from './audit-replay.js';
import { checkFrozenBaselines, type FrozenBaselinesVerdict } from './frozen-baselines-check.js';
import { decodeCursor, encodeCursor, type PageInfo } from './paging.js';

export interface AuditEntryView {
  seq: number;
  at: string;
  actor: string;
  action: string;
  entityType: string;
  entityId: string;
  before: unknown;
  after: unknown;
  hash: string;
  prevHash: string;
}

/**
 * The entity names users see, mapped to how their rows are filed: readings,
 * rates and a contract are written as changes to their meter or facility
 * (the row's entity id is that meter or facility), observations and a
 * normal year to their weather station. Plurals are accepted too. Any other
 * name is taken as a stored entity type.
 */
export const AUDIT_ENTITY_NAMES: Readonly<Record<string, { entityType: string; actions?: readonly string[] }>> = {
  reading: { entityType: 'meter', actions: ['post-readings'] },
  readings: { entityType: 'meter', actions: ['post-readings'] },
  rate: { entityType: 'meter', actions: ['put-rates'] },
  rates: { entityType: 'meter', actions: ['put-rates'] },
  observation: { entityType: 'weather-station', actions: ['upsert-observations'] },
  observations: { entityType: 'weather-station', actions: ['upsert-observations'] },
  weather: { entityType: 'weather-station', actions: ['upsert-observations'] },
  'normal-year': { entityType: 'weather-station', actions: ['put-normal-year'] },
  contract: { entityType: 'facility', actions: ['put-contract'] },
  facilities: { entityType: 'facility' },
  meters: { entityType: 'meter' },
  'weather-stations': { entityType: 'weather-station' },
  baselines: { entityType: 'baseline' },
  adjustments: { entityType: 'adjustment' },
  'api-keys': { entityType: 'api-key' },
};

/** How `entity` of a query is looked up: a user-facing name's stored type and actions, or the name itself. */
export function resolveAuditEntity(entity: string): { entityType: string; actions?: readonly string[] } {
  return AUDIT_ENTITY_NAMES[entity] ?? { entityType: entity };
}

export interface AuditFilter {
  /** A stored entity type or a user-facing name (AUDIT_ENTITY_NAMES). */
  entityType?: string;
  entityId?: string;
  /** A date (its midnight UTC) or a date-time with an offset. */
  since?: string;
  limit: number;
  afterSeq?: number;
  /** A nextCursor of an earlier page (the same place as afterSeq; the later of the two wins). */
  cursor?: string;
}

export interface AuditPage extends PageInfo {
  entries: AuditEntryView[];
  /** The `after` of the next page, when there is one. */
  next?: number;
}

export function toAuditEntry(row: AuditRow): AuditEntryView {
  return {
    seq: row.seq,
    at: row.at,
    actor: row.actor,
    action: row.action,
    entityType: row.entity_type,
    entityId: row.entity_id,
    before: row.before_json === null ? null : JSON.parse(row.before_json),
    after: row.after_json === null ? null : JSON.parse(row.after_json),
    hash: row.hash,
    prevHash: row.prev_hash,
  };
}

/** Stored times are UTC ISO strings, so `since` is brought to the same form to compare as text. */
export function sinceAsStoredTime(since: string): string {
  return isIsoDate(since) ? `${since}T00:00:00.000Z` : new Date(since).toISOString();
}

export async function listAuditEntries(db: Executor, organisationId: string, filter: AuditFilter): Promise<AuditPage> {
  const fromCursor = decodeCursor('audit', filter.cursor, 'n')?.[0] as number | undefined;
  const afterSeq = fromCursor === undefined ? filter.afterSeq : Math.max(fromCursor, filter.afterSeq ?? 0);
  const rows = await listAudit(db, {
    organisationId,
    limit: filter.limit + 1, // one more than asked tells whether another page follows
    ...(filter.entityType !== undefined ? resolveAuditEntity(filter.entityType) : {}),
    ...(filter.entityId !== undefined ? { entityId: filter.entityId } : {}),
    ...(filter.since !== undefined ? { since: sinceAsStoredTime(filter.since) } : {}),
    ...(afterSeq !== undefined ? { afterSeq } : {}),
  });
  const page = rows.slice(0, filter.limit).map(toAuditEntry);
  const last = page[page.length - 1];
  const more = rows.length > filter.limit && last !== undefined;
  return {
    entries: page,
    ...(more ? { next: last.seq } : {}),
    limit: filter.limit,
    nextCursor: more ? encodeCursor('audit', [last.seq]) : null,
  };
}

/** How far a verification goes: the chain and frozen baselines, or also a replay of every table. */
export type VerifyDepth = 'chain' | 'full';

export interface AuditVerdict extends ChainVerdict {
  /** Every frozen and superseded baseline against the content hash its freeze row recorded. */
  baselines: FrozenBaselinesVerdict;
  /** With depth "full": the tables rebuilt from the trail and compared with the stored ones. */
  replay?: ReplayVerdict;
}

/**
 * Verify the organisation's own chain (other organisations' activity stays
 * invisible), its frozen baselines against their freeze rows and, at depth
 * "full", every result-bearing table against a replay of the trail. ok is
 * true only when all of them hold.
 */
export async function verifyAudit(
  db: Executor,
  organisationId: string,
  depth: VerifyDepth = 'chain',
): Promise<AuditVerdict> {
  const chain = await verifyAuditChain(db, organisationId);
  const baselines = await checkFrozenBaselines(db, organisationId);
  const replay = depth === 'full' ? await replayAuditTrail(db, organisationId) : undefined;
  return {
    ...chain,
    ok: chain.ok && baselines.ok && (replay?.ok ?? true),
    baselines,
    ...(replay ? { replay } : {}),
  };
}
