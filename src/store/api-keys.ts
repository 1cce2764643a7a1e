/**
 * API keys: `mvl_<id>_<secret>`. Only SHA-256 of the secret is stored; the
 * whole key is shown once, when it is made. The secret has 240 bits of
 * randomness, so a plain hash (no slow KDF) is enough.
 */
import { randomBytes, timingSafeEqual } from 'node:crypto';
import { sha256Hex } from '../lib/canonical-json.js';
import type { ApiKeyRow } from './schema.js';
import type { Executor } from './executor.js';
import type { Role } from '../domain/principal.js';

const ALPHABET = 'ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789';
const KEY_PATTERN = /^mvl_([A-Za-z0-9]{8})_([A-Za-z0-9]{32,})$/;

export const ROLES: readonly Role[] = ['admin', 'engineer', 'analyst', 'integration'];

function randomText(length: number): string {
  const bytes = randomBytes(length * 2);
  let out = '';
  // Rejection sampling keeps every character equally likely.
  for (let i = 0; i < bytes.length && out.length < length; i++) {
    const b = bytes[i]!;
    if (b < 248) out += ALPHABET[b % 62];
  }
  return out.length === length ? out : out + randomText(length - out.length);
}

export function generateApiKey(): { id: string; secret: string; token: string } {
  const id = randomText(8);
  const secret = randomText(40);
  return { id, secret, token: `mvl_${id}_${secret}` };
}

export function parseApiKey(token: string): { id: string; secret: string } | null {
  const match = KEY_PATTERN.exec(token);
  return match ? { id: match[1]!, secret: match[2]! } : null;
}

/** The stored key if the token is a live key, else null. Constant-time on the secret. */
export async function authenticate(db: Executor, token: string): Promise<ApiKeyRow | null> {
  const parsed = parseApiKey(token);
  if (!parsed) return null;
  const row = await db.selectFrom('api_keys').selectAll().where('id', '=', parsed.id).executeTakeFirst();
  if (!row || row.revoked_at !== null) return null;
  const expected = Buffer.from(row.secret_hash, 'hex');
  const given = Buffer.from(sha256Hex(parsed.secret), 'hex');
  return expected.length === given.length && timingSafeEqual(expected, given) ? row : null;
}

export interface NewKey {
  organisationId: string;
  name: string;
  role: Role;
  at: string;
  /** Use this exact token (the bootstrap key); otherwise one is generated. */
  token?: string;
}

/** Store a key; returns the row and the token (shown once). */
export async function insertApiKey(db: Executor, key: NewKey): Promise<{ row: ApiKeyRow; token: string }> {
  const made = key.token ? { ...parseApiKey(key.token)!, token: key.token } : generateApiKey();
  const row: ApiKeyRow = {
    id: made.id,
    organisation_id: key.organisationId,
    name: key.name,
    role: key.role,
    secret_hash: sha256Hex(made.secret),
    created_at: key.at,
    revoked_at: null,
  };
  await db.insertInto('api_keys').values(row).execute();
  return { row, token: made.token };
}

/** A key as it may be shown: never the hash. */
export function publicKey(row: ApiKeyRow): {
  id: string;
  name: string;
  role: Role;
  createdAt: string;
  revokedAt: string | null;
} {
  return { id: row.id, name: row.name, role: row.role, createdAt: row.created_at, revokedAt: row.revoked_at };
}
