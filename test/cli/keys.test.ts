/**
 * `mvledger keys`, in-process against a temporary SQLite file. Check values:
 * the command's contract (exit codes 0 and 2, the token once on stdout, the
 * listing's columns) and keys the test makes (synthetic: the test sets the truth).
 */
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { openStore } from '../../src/store/connect.js';
import { authenticate } from '../../src/store/api-keys.js';
import { makeTempFolder, runCli } from './helpers.js';

const folder = makeTempFolder();
const databaseUrl = `sqlite:${folder.path('ledger.sqlite')}`;

beforeAll(() => {
  vi.stubEnv('DATABASE_URL', databaseUrl);
});
afterAll(() => {
  vi.unstubAllEnvs();
  folder.remove();
});

/** Look a token up in the database the command wrote to. */
async function storedKey(token: string) {
  const store = openStore(databaseUrl);
  try {
    return await authenticate(store.db, token);
  } finally {
    await store.close();
  }
}

async function auditActions(entityId: string): Promise<{ actor: string; action: string; text: string }[]> {
  const store = openStore(databaseUrl);
  try {
    const rows = await store.db
      .selectFrom('audit_log')
      .selectAll()
      .where('entity_id', '=', entityId)
      .orderBy('seq')
      .execute();
    return rows.map((row) => ({ actor: row.actor, action: row.action, text: JSON.stringify(row) }));
  } finally {
    await store.close();
  }
}

let organisationId: string;
let adminToken: string;

describe('mvledger keys', () => {
  it('creates a new organisation and its admin key, printing the token alone on stdout', async () => {
    const run = await runCli([
      'keys',
      'create',
      '--org-name',
      'Harbourview Estates (invented)',
      '--role',
      'admin',
      '--name',
      'first admin',
    ]);
    expect(run.code).toBe(0);
    expect(run.stdout).toMatch(/^mvl_[A-Za-z0-9]{8}_[A-Za-z0-9]{32,}\n$/); // contract: the token, once, alone
    adminToken = run.stdout.trim();
    expect(run.stderr).toContain('shown only this once');
    expect(run.stderr).not.toContain(adminToken.split('_')[2]);
    const key = await storedKey(adminToken);
    expect(key).toMatchObject({ role: 'admin', name: 'first admin', revoked_at: null });
    organisationId = key!.organisation_id;
    expect(run.stderr).toContain(organisationId);
    const audit = await auditActions(key!.id);
    expect(audit.map((a) => [a.actor, a.action])).toEqual([['system', 'create']]);
    expect(audit[0]!.text).not.toContain(adminToken.split('_')[2]);
    expect(audit[0]!.text).not.toContain(key!.secret_hash);
  });

  it('adds a key to an existing organisation and lists both, without tokens', async () => {
    const run = await runCli([
      'keys',
      'create',
      '--org',
      organisationId,
      '--role',
      'integration',
      '--name',
      'billing feed',
    ]);
    expect(run.code).toBe(0);
    const token = run.stdout.trim();
    const list = await runCli(['keys', 'list', '--org', organisationId]);
    expect(list.code).toBe(0);
    const [header, rule, ...rows] = list.stdout.trimEnd().split('\n');
    expect(header!.split(/\s+/)).toEqual(['id', 'org', 'name', 'role', 'created', 'revoked']); // contract: the listing's columns
    expect(rule).toMatch(/^[- ]+$/);
    expect(rows).toHaveLength(2);
    expect(rows.join('\n')).toContain('billing feed');
    expect(rows.every((row) => row.includes(organisationId) && row.trimEnd().endsWith('-'))).toBe(true);
    for (const secret of [token, adminToken].map((t) => t.split('_')[2]!)) expect(list.stdout).not.toContain(secret);
  });

  it('lists every organisation without --org', async () => {
    await runCli(['keys', 'create', '--org-name', 'Second Org (invented)', '--role', 'analyst', '--name', 'reader']);
    const list = await runCli(['keys', 'list']);
    expect(list.code).toBe(0);
    expect(list.stdout.trimEnd().split('\n')).toHaveLength(2 + 3); // header, rule and three keys
  });

  it('revokes a key: it no longer authenticates, the audit says so, and a second revoke changes nothing', async () => {
    const made = await runCli(['keys', 'create', '--org', organisationId, '--role', 'engineer', '--name', 'temporary']);
    const token = made.stdout.trim();
    const id = token.split('_')[1]!;
    const run = await runCli(['keys', 'revoke', id]);
    expect(run.code).toBe(0);
    expect(run.stdout).toContain(`revoked key ${id}`);
    expect(await storedKey(token)).toBeNull();
    expect((await auditActions(id)).map((a) => [a.actor, a.action])).toEqual([
      ['system', 'create'],
      ['system', 'revoke'],
    ]);
    const again = await runCli(['keys', 'revoke', id]);
    expect(again.code).toBe(0);
    expect(again.stdout).toContain('already revoked');
    expect(await auditActions(id)).toHaveLength(2);
    const list = await runCli(['keys', 'list', '--org', organisationId]);
    expect(list.stdout.split('\n').find((line) => line.startsWith(id))).not.toMatch(/-$/);
  });

  const bad: { args: string[]; says: RegExp }[] = [
    { args: ['keys'], says: /needs a subcommand/ },
    { args: ['keys', 'rotate'], says: /unknown keys subcommand "rotate"/ },
    { args: ['keys', 'create', '--role', 'admin', '--name', 'x'], says: /--org ID .* or --org-name NAME/ },
    {
      args: ['keys', 'create', '--org', 'org_a', '--org-name', 'B', '--role', 'admin', '--name', 'x'],
      says: /either --org ID/,
    },
    { args: ['keys', 'create', '--org-name', 'B', '--name', 'x'], says: /--role is required/ },
    {
      args: ['keys', 'create', '--org-name', 'B', '--role', 'root', '--name', 'x'],
      says: /--role must be one of admin, engineer, analyst, integration, got "root"/,
    },
    { args: ['keys', 'create', '--org-name', 'B', '--role', 'admin'], says: /--name is required/ },
    {
      args: ['keys', 'create', '--org-name', ' ', '--role', 'admin', '--name', 'x'],
      says: /--org-name must not be empty/,
    },
    {
      args: ['keys', 'create', '--org-name', 'B', '--role', 'admin', '--name', 'x', '--colour'],
      says: /unknown option --colour/,
    },
    { args: ['keys', 'create', '--org-name', 'B', '--role', 'admin', '--name'], says: /option --name needs a value/ },
    {
      args: ['keys', 'create', '--org', 'org_missing', '--role', 'admin', '--name', 'x'],
      says: /--org: no organisation org_missing/,
    },
    { args: ['keys', 'list', 'extra'], says: /unexpected argument extra/ },
    { args: ['keys', 'list', '--org', 'org_missing'], says: /--org: no organisation org_missing/ },
    { args: ['keys', 'revoke'], says: /exactly one key id/ },
    { args: ['keys', 'revoke', 'a', 'b'], says: /exactly one key id/ },
    { args: ['keys', 'revoke', 'Zzzzzzzz'], says: /no API key Zzzzzzzz/ },
  ];
  for (const c of bad) {
    it(`refuses ${c.args.slice(1).join(' ') || '(nothing)'} with exit 2 and one line`, async () => {
      const run = await runCli(c.args);
      expect(run.code).toBe(2); // contract: bad arguments exit 2
      expect(run.stdout).toBe('');
      expect(run.stderr).toMatch(c.says);
      expect(run.stderr.trimEnd().split('\n')).toHaveLength(1);
    });
  }

  it('refuses a DATABASE_URL it cannot use with exit 2', async () => {
    vi.stubEnv('DATABASE_URL', 'mysql://nowhere');
    try {
      const run = await runCli(['keys', 'list']);
      expect(run.code).toBe(2);
      expect(run.stderr).toMatch(/^mvledger: DATABASE_URL/);
    } finally {
      vi.stubEnv('DATABASE_URL', databaseUrl);
    }
  });

  it('prints its usage for --help and `help keys`', async () => {
    for (const args of [
      ['keys', '--help'],
      ['help', 'keys'],
    ]) {
      const run = await runCli(args);
      expect(run.code).toBe(0);
      expect(run.stdout).toMatch(/^Usage: mvledger keys create/);
    }
  });
});
