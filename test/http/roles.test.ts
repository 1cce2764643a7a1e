/**
 * Who may call what, for every route the app has: the routes are read from
 * the app's own OpenAPI document, so a new route is covered without editing
 * this file. Check values: the role → permission table of
 * src/domain/principal.ts (ROLE_PERMISSIONS) and the API contract (401 for a
 * missing, malformed or revoked key; 403 for a role without the permission).
 */
import { Writable } from 'node:stream';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildApp, LOG_REDACTIONS } from '../../src/http/app.js';
import { allows, ROLE_PERMISSIONS, type Permission } from '../../src/domain/principal.js';
import { ROLES } from '../../src/store/api-keys.js';
import type { Role } from '../../src/domain/principal.js';
import { makeTestApi, type CallOptions, type TestApi } from '../support/api.js';

const METHODS = ['get', 'post', 'put', 'patch', 'delete'] as const;
const PERMISSIONS = Object.keys({
  read: 0,
  savings: 0,
  data: 0,
  ledger: 0,
  keys: 0,
  approve: 0,
  reconcile: 0,
  self: 0,
} satisfies Record<Permission, 0>) as Permission[];

interface Operation {
  method: (typeof METHODS)[number];
  path: string;
  secured: boolean;
}

interface Outcome {
  status: number;
  text: string;
}

type Caller = Role | 'other' | 'none' | 'malformed' | 'forged' | 'revoked';
const KEYLESS: Caller[] = ['none', 'malformed', 'forged', 'revoked'];
const CALLERS: Caller[] = [...ROLES, 'other', ...KEYLESS];

let api: TestApi;
let operations: Operation[];
let revokedToken: string;
/** Every token the test knows: none may appear in a response or a log line. */
const tokens: string[] = [];
const outcomes = new Map<string, Outcome>();
const cell = (op: Operation, caller: Caller) => `${op.method.toUpperCase()} ${op.path} as ${caller}`;

/** A request for the operation with placeholder ids and a minimal body: enough to reach the permission check. */
function urlOf(op: Operation): string {
  return op.path.replace(/\{[^}]+\}/g, 'placeholder-id');
}

function optionsFor(op: Operation, caller: Caller): CallOptions {
  const body = op.method === 'get' || op.method === 'delete' ? {} : { body: {} };
  switch (caller) {
    case 'none':
      return { as: 'none', ...body };
    case 'malformed':
      return { as: { token: 'not-an-api-key' }, ...body };
    case 'forged':
      // The right shape and a real key id, with a made-up secret.
      return { as: { token: `mvl_${api.keys.admin.split('_')[1]}_${'x'.repeat(40)}` }, ...body };
    case 'revoked':
      return { as: { token: revokedToken }, ...body };
    default:
      return { as: caller, ...body };
  }
}

beforeAll(async () => {
  api = await makeTestApi();
  const made = await api.call('POST', '/v1/api-keys', { body: { name: 'soon revoked', role: 'admin' } });
  revokedToken = made.json.token;
  expect((await api.call('DELETE', `/v1/api-keys/${made.json.key.id}`)).status).toBe(200);
  tokens.push(...Object.values(api.keys), api.otherKey, revokedToken);

  const document = (await api.call('GET', '/openapi.json', { as: 'none' })).json as {
    paths: Record<string, Record<string, { security?: unknown[] }>>;
  };
  operations = Object.entries(document.paths).flatMap(([path, item]) =>
    METHODS.filter((method) => item[method]).map((method) => ({
      method,
      path,
      secured: (item[method]!.security ?? []).length > 0,
    })),
  );
  for (const op of operations) {
    for (const caller of CALLERS) {
      const response = await api.call(op.method.toUpperCase() as 'GET', urlOf(op), optionsFor(op, caller));
      outcomes.set(cell(op, caller), { status: response.status, text: response.text });
    }
  }
});
afterAll(async () => api.close());

function statusOf(op: Operation, caller: Caller): number {
  return outcomes.get(cell(op, caller))!.status;
}

/** The permissions whose roles are exactly the roles that were let through (savings, reconcile and self are every role's). */
function observedPermissions(op: Operation): Permission[] {
  const through = new Set(ROLES.filter((role) => statusOf(op, role) !== 403));
  return PERMISSIONS.filter((p) => ROLES.every((role) => allows(role, p) === through.has(role)));
}

/**
 * The permission a route should need, from the meaning of each permission
 * (src/domain/principal.ts): keys for API keys; savings for savings; data to
 * post readings and observations; read for other GETs; approve for a statement's
 * approval, rejection and voiding, and for signing the audit head (what those
 * who check statements ask for); self for the calling key's own description;
 * ledger for other writes.
 */
function conventionalPermission(op: Operation): Permission {
  if (op.path === '/v1/me') return 'self';
  if (op.path.startsWith('/v1/api-keys')) return 'keys';
  if (/^\/v1\/statements\/\{id\}\/(approve|reject|void)$/.test(op.path)) return 'approve';
  if (op.method === 'post' && op.path === '/v1/audit/checkpoints') return 'approve';
  if (/\/savings(\/|$)/.test(op.path)) return 'savings';
  // What a billing system reads back to reconcile: the meters and a meter's readings.
  if (op.method === 'get' && /^\/v1\/meters(\/\{id\}(\/readings)?)?$/.test(op.path)) return 'reconcile';
  // A variable's values are posted and read back like readings (a production or occupancy system feeds them).
  if (op.method === 'get' && op.path === '/v1/variables/{id}/values') return 'reconcile';
  if (op.method === 'get') return 'read';
  // Station files posted as published are weather data, like observations.
  if (/\/(readings|observations|imports|values)(\/|$)/.test(op.path)) return 'data';
  return 'ledger';
}

describe('the role matrix over every route in the OpenAPI document', () => {
  it('covers the routes this issue adds (a sanity check that enumeration works)', () => {
    const listed = operations.map((op) => `${op.method} ${op.path}`);
    for (const expected of [
      'post /v1/facilities',
      'get /v1/meters/{id}',
      'delete /v1/api-keys/{id}',
      'get /v1/audit/verify',
    ]) {
      expect(listed).toContain(expected);
    }
  });

  it('never answers 5xx', () => {
    const failures = [...outcomes].filter(([, o]) => o.status >= 500).map(([at, o]) => `${at}: ${o.status}`);
    expect(failures).toEqual([]);
  });

  it('answers 401 to no key, a malformed key, a forged secret and a revoked key on every /v1 route', () => {
    const wrong = operations
      .filter((op) => op.secured)
      .flatMap((op) =>
        KEYLESS.filter((caller) => statusOf(op, caller) !== 401).map(
          (caller) => `${cell(op, caller)}: ${statusOf(op, caller)}`,
        ),
      );
    expect(wrong).toEqual([]);
  });

  it('gives every /v1 route a security requirement, and lets anyone call the rest', () => {
    expect(operations.filter((op) => op.path.startsWith('/v1/') && !op.secured).map((op) => op.path)).toEqual([]);
    const refused = operations
      .filter((op) => !op.secured)
      .flatMap((op) => CALLERS.filter((c) => [401, 403].includes(statusOf(op, c))).map((c) => cell(op, c)));
    expect(refused).toEqual([]);
  });

  it('lets each role through exactly when ROLE_PERMISSIONS grants one permission the route needs', () => {
    const inconsistent = operations.filter((op) => op.secured && observedPermissions(op).length === 0);
    const detail = inconsistent.map(
      (op) => `${op.method.toUpperCase()} ${op.path}: ${ROLES.map((r) => `${r} ${statusOf(op, r)}`).join(', ')}`,
    );
    expect(detail).toEqual([]);
    // And no let-through role is refused for want of a key.
    const unauthorised = operations
      .filter((op) => op.secured)
      .flatMap((op) => [...ROLES, 'other' as const].filter((c) => statusOf(op, c) === 401).map((c) => cell(op, c)));
    expect(unauthorised).toEqual([]);
  });

  it("lets another organisation's admin key through as an admin (its ids simply do not match ours)", () => {
    const differ = operations
      .filter((op) => (statusOf(op, 'other') === 403) !== (statusOf(op, 'admin') === 403))
      .map((op) => cell(op, 'other'));
    expect(differ).toEqual([]);
  });

  it('asks each route for the permission its meaning calls for', () => {
    // If a route legitimately differs, name it here with the reason.
    const mismatched = operations
      .filter((op) => op.secured)
      .map((op) => ({
        route: `${op.method.toUpperCase()} ${op.path}`,
        needs: observedPermissions(op),
        expected: conventionalPermission(op),
      }))
      .filter((row) => !row.needs.includes(row.expected));
    expect(mismatched).toEqual([]);
  });

  it('gives the admin role every permission and the others the documented subsets', () => {
    // from src/domain/principal.ts, restated so a change to the table is a visible decision
    expect(ROLE_PERMISSIONS).toEqual({
      admin: ['read', 'savings', 'data', 'ledger', 'keys', 'approve', 'reconcile', 'self'],
      engineer: ['read', 'savings', 'data', 'ledger', 'reconcile', 'self'],
      analyst: ['read', 'savings', 'approve', 'reconcile', 'self'],
      integration: ['savings', 'data', 'reconcile', 'self'],
    });
  });
});

describe('secrets stay secret', () => {
  it('never puts a token, a secret or its stored hash in a response', async () => {
    const hashes = (await api.store.db.selectFrom('api_keys').select('secret_hash').execute()).map(
      (row) => row.secret_hash,
    );
    const secrets = tokens.map((token) => token.split('_')[2]!);
    const leaks = [...outcomes]
      .filter(([, o]) => [...secrets, ...hashes, 'secret_hash'].some((s) => o.text.includes(s)))
      .map(([at]) => at);
    expect(leaks).toEqual([]);
    const listing = await api.call('GET', '/v1/api-keys');
    expect([...secrets, ...hashes].some((s) => listing.text.includes(s))).toBe(false);
  });

  it('never writes a key to the log, even at trace level', async () => {
    const lines: string[] = [];
    const stream = new Writable({
      write(chunk, _encoding, done) {
        lines.push(String(chunk));
        done();
      },
    });
    const app = await buildApp({ store: api.store, logger: { level: 'trace', stream, redact: LOG_REDACTIONS } });
    try {
      const send = async (
        method: 'GET' | 'POST',
        url: string,
        token: string,
        payload?: unknown,
        headers: Record<string, string> = {},
      ) =>
        app.inject({
          method,
          url,
          headers: { authorization: `Bearer ${token}`, ...headers },
          ...(payload ? { payload: payload as object } : {}),
        });
      const made = await send('POST', '/v1/api-keys', api.keys.admin, { name: 'logged?', role: 'analyst' });
      const madeToken = made.json().token as string;
      expect(madeToken).toMatch(/^mvl_/);
      const forged = `mvl_AAAAAAAA_${'y'.repeat(40)}`;
      for (const token of [...tokens, madeToken, forged]) await send('GET', '/v1/facilities', token);
      await send(
        'POST',
        '/v1/facilities',
        api.keys.engineer,
        { name: 'Logged Hall' },
        { 'idempotency-key': 'log-check' },
      );
      const secrets = [...tokens, madeToken, forged].map((token) => token.split('_')[2]!);
      expect(lines.length).toBeGreaterThan(10); // the logger really was writing
      expect(lines.filter((line) => secrets.some((s) => line.includes(s)))).toEqual([]);
    } finally {
      await app.close();
    }
  });
});
