/**
 * Every API key a document carries must have been issued on its audit trail:
 * a `create` row for the key's id stating its name, role and issue time, and
 * (for a revoked key) a `revoke` row stating when. A key row added to an
 * export by hand, with no such record, would let its holder in after the
 * import; the check refuses the document and names the key.
 */
import { fail } from './check-rows.js';
import type { ExportRow } from './document.js';

interface KeyRecord {
  id?: unknown;
  name?: unknown;
  role?: unknown;
  createdAt?: unknown;
  revokedAt?: unknown;
}

function recordOf(json: unknown): KeyRecord | null {
  if (typeof json !== 'string') return null;
  try {
    const value: unknown = JSON.parse(json);
    return value !== null && typeof value === 'object' && !Array.isArray(value) ? (value as KeyRecord) : null;
  } catch {
    return null;
  }
}

/** Refuses the first key whose issue (or revocation) is not on the audit trail, naming the key's id. */
export function checkKeysIssuedOnRecord(keys: readonly ExportRow[], audit: readonly ExportRow[]): void {
  const created = new Map<string, KeyRecord[]>();
  const revoked = new Map<string, KeyRecord[]>();
  for (const row of audit) {
    if (row.entity_type !== 'api-key' || typeof row.entity_id !== 'string') continue;
    const target = row.action === 'create' ? created : row.action === 'revoke' ? revoked : null;
    const record = recordOf(row.after_json);
    if (!target || !record) continue;
    target.set(row.entity_id, [...(target.get(row.entity_id) ?? []), record]);
  }
  keys.forEach((key, index) => {
    const id = String(key.id);
    const path = `tables.api_keys[${index}]`;
    const issue = (created.get(id) ?? []).find(
      (r) => r.id === key.id && r.name === key.name && r.role === key.role && r.createdAt === key.created_at,
    );
    if (!issue)
      fail(
        path,
        `key ${id} has no audit record of its issue with this name, role and time; the import refuses unrecorded keys`,
      );
    if (key.revoked_at !== null && !(revoked.get(id) ?? []).some((r) => r.revokedAt === key.revoked_at))
      fail(`${path}.revoked_at`, `key ${id} has no audit record of its revocation at ${String(key.revoked_at)}`);
  });
}
