/**
 * `mvledger verify --org ID [--full]` against a database: the chain, the
 * frozen baselines and, with --full, every table against the trail. Check
 * values: the rows the test writes itself (synthetic: the test sets the
 * truth) and the edit it makes behind the service's back.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { EXIT_VERIFY_FAILED, runVerify } from '../../src/cli/commands/verify.js';
import { createKey, createOrganisation } from '../../src/services/organisations.js';
import { openStore } from '../../src/store/connect.js';
import { migrateToLatest } from '../../src/store/migrate.js';

let folder: string;
let env: NodeJS.ProcessEnv;
let organisationId: string;

beforeAll(async () => {
  folder = mkdtempSync(join(tmpdir(), 'mvl-verify-'));
  env = { DATABASE_URL: `sqlite:${join(folder, 'ledger.sqlite')}` };
  const store = openStore(env.DATABASE_URL!);
  await migrateToLatest(store.db);
  organisationId = (await createOrganisation(store.db, 'Invented verify test org', '2026-01-01T00:00:00.000Z')).id;
  await createKey(store.db, { organisationId, name: 'analyst key', role: 'analyst', at: '2026-01-01T00:00:01.000Z' });
  await store.close();
});
afterAll(() => rmSync(folder, { recursive: true, force: true }));

describe('mvledger verify --org', () => {
  it('verifies an untouched organisation, with the tables at --full', async () => {
    const chain = await runVerify(['--org', organisationId], env);
    expect(chain.code).toBe(0);
    expect(chain.stdout).toMatch(
      /^chain: intact, 2 rows, head 2 [0-9a-f]{64}\nfrozen baselines: 0 checked, 0 not as frozen\nverified\n$/,
    );
    const full = await runVerify(['--org', organisationId, '--full'], env);
    expect(full.code).toBe(0);
    expect(full.stdout).toContain('api-keys 1, variables 0, variable-values 0, calendars 0; 0 differences');
  });

  it('names a key whose role was raised behind the service, with exit code 4', async () => {
    const store = openStore(env.DATABASE_URL!);
    await store.db
      .updateTable('api_keys')
      .set({ role: 'admin' })
      .where('organisation_id', '=', organisationId)
      .execute();
    await store.close();
    const full = await runVerify(['--org', organisationId, '--full'], env);
    expect(full.code).toBe(EXIT_VERIFY_FAILED);
    expect(full.stdout).toMatch(
      /\n {2}api-keys \S+: stored .*"role":"admin".*; the audit trail says .*"role":"analyst".*\n/,
    );
    expect(full.stdout.trimEnd().endsWith('NOT VERIFIED')).toBe(true);
    // The chain and the baselines alone still hold: only the replay sees a table edit.
    expect((await runVerify(['--org', organisationId], env)).code).toBe(0);
  });

  it('refuses an unknown organisation and a missing --org', async () => {
    await expect(runVerify(['--org', 'org_missing'], env)).rejects.toThrow('--org: no organisation org_missing');
    await expect(runVerify([], env)).rejects.toThrow('give --org ID');
  });
});
