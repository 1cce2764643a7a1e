/**
 * `mvledger export` and `mvledger import`, in-process, on the invented demo
 * district seeded into a temporary SQLite file. The round trip goes into a
 * fresh SQLite file, and into a fresh PostgreSQL schema when a server answers.
 *
 * Check values: the source's own export (synthetic: the demo sets the
 * truth): exporting the target must give the same document; the command's
 * contract (exit 0, 2 for bad input, 1 for an internal failure; one line on
 * an error; nothing stored, shown by databaseDigest).
 */
import { existsSync, readFileSync } from 'node:fs';
import { randomBytes } from 'node:crypto';
import { sql } from 'kysely';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { runDemo, type DemoSeed } from '../../src/demo/main.js';
import { authenticate } from '../../src/store/api-keys.js';
import { openStore } from '../../src/store/connect.js';
import { migrateToLatest } from '../../src/store/migrate.js';
import { dropTestDatabase, postgresReachable, schemaPrefix, testPostgresUrl } from '../support/database.js';
import { databaseDigest } from '../support/db-digest.js';
import { makeTempFolder, runCli, type CliRun } from './helpers.js';

const folder = makeTempFolder();
const sourceUrl = `sqlite:${folder.path('source.sqlite')}`;
const exportFile = folder.path('export.json');
let seed: DemoSeed;
let organisationId: string;

/** Run the CLI against the database at `url`. */
function cli(url: string, args: string[]): Promise<CliRun> {
  vi.stubEnv('DATABASE_URL', url);
  return runCli(args);
}

/** The document without the moment it was written. */
function content(text: string): Record<string, unknown> {
  const { exportedAt: _exportedAt, ...rest } = JSON.parse(text) as Record<string, unknown>;
  return rest;
}

async function digestOf(url: string): Promise<string> {
  const store = openStore(url);
  try {
    await migrateToLatest(store.db);
    return await databaseDigest(store.db);
  } finally {
    await store.close();
  }
}

function freshPostgresUrl(): string {
  const url = new URL(testPostgresUrl());
  url.searchParams.set('schema', `${schemaPrefix()}${process.pid}_${randomBytes(4).toString('hex')}`);
  return url.toString();
}

beforeAll(async () => {
  ({ seed } = await runDemo({ seedOnly: true, databaseFile: folder.path('source.sqlite'), port: 0, print: () => {} }));
  const store = openStore(sourceUrl);
  try {
    organisationId = (await store.db.selectFrom('organisations').select('id').executeTakeFirstOrThrow()).id;
  } finally {
    await store.close();
  }
}, 60_000);

afterAll(() => {
  vi.unstubAllEnvs();
  folder.remove();
});

describe('mvledger export', () => {
  it('writes the document to --out, or to stdout, with one line per table on stderr and no secret', async () => {
    const toFile = await cli(sourceUrl, ['export', '--org', organisationId, '--out', exportFile]);
    expect(toFile.code).toBe(0);
    expect(toFile.stdout).toBe('');
    const text = readFileSync(exportFile, 'utf8');
    const toStdout = await cli(sourceUrl, ['export', '--org', organisationId]);
    expect(toStdout.code).toBe(0);
    expect(content(toStdout.stdout)).toEqual(content(text));
    expect(JSON.parse(text)).toMatchObject({
      format: 'mvledger-export',
      version: 6,
      organisation: { id: organisationId },
    }); // the format's own contract
    const document = JSON.parse(text) as { tables: Record<string, unknown[]> };
    for (const [table, rows] of Object.entries(document.tables))
      expect(toFile.stderr).toContain(`  ${table}: ${rows.length} ${rows.length === 1 ? 'row' : 'rows'}\n`);
    expect(toFile.stderr).toContain(`${Buffer.byteLength(text)} bytes`);
    for (const token of [seed.adminKey, seed.analystKey, seed.integrationKey]) {
      expect(text).not.toContain(token.split('_')[2]); // only hashes travel
      expect(toFile.stderr).not.toContain(token.split('_')[2]);
    }
  });

  const bad: { what: string; args: () => string[]; says: RegExp }[] = [
    { what: 'without --org', args: () => ['export'], says: /^mvledger: --org ID is required/ },
    {
      what: 'an unknown organisation',
      args: () => ['export', '--org', 'org_missing'],
      says: /^mvledger: --org: no organisation org_missing in sqlite file /,
    },
    {
      what: 'an unknown option',
      args: () => ['export', '--org', organisationId, '--pretty'],
      says: /^mvledger: unknown option --pretty\n$/,
    },
    {
      what: 'a folder that does not exist',
      args: () => ['export', '--org', organisationId, '--out', folder.path('no/such/dir/x.json')],
      says: /^mvledger: --out .*x\.json: cannot write it \(ENOENT\)\n$/,
    },
  ];
  for (const c of bad) {
    it(`refuses ${c.what} with exit 2 and one line`, async () => {
      const run = await cli(sourceUrl, c.args());
      expect(run.code).toBe(2); // contract: bad input exits 2
      expect(run.stdout).toBe('');
      expect(run.stderr).toMatch(c.says);
      expect(run.stderr.trimEnd().split('\n')).toHaveLength(1);
    });
  }

  it('refuses a SQLite file that does not exist, without creating it', async () => {
    const missing = folder.path('missing.sqlite');
    const run = await cli(`sqlite:${missing}`, ['export', '--org', organisationId]);
    expect(run.code).toBe(2);
    expect(run.stderr).toMatch(/^mvledger: DATABASE_URL: no database file .*missing\.sqlite to export from\n$/);
    expect(existsSync(missing)).toBe(false);
  });
});

describe('mvledger import', () => {
  const targets: { name: string; url: () => Promise<string | null> }[] = [
    { name: 'a fresh SQLite file', url: async () => `sqlite:${folder.path('target.sqlite')}` },
    { name: 'a fresh PostgreSQL schema', url: async () => ((await postgresReachable()) ? freshPostgresUrl() : null) },
  ];
  for (const target of targets) {
    it(`round-trips into ${target.name}: the target exports the same document and the source's keys work there`, async (context) => {
      const url = await target.url();
      if (url === null) return context.skip('no PostgreSQL server answers');
      try {
        const run = await cli(url, ['import', '--in', exportFile]);
        expect(run.code, run.stderr).toBe(0);
        expect(run.stdout).toBe('');
        expect(run.stderr).toMatch(new RegExp(`^imported organisation ${organisationId} `));
        expect(run.stderr).toContain('  baselines: 8 rows\n'); // synthetic: the demo freezes one baseline on each of seven meters, and the early-years centre's first one is superseded
        expect(run.stderr).toContain('(verified in the target)');
        const again = await cli(url, ['export', '--org', organisationId]);
        expect(again.code).toBe(0);
        expect(content(again.stdout)).toEqual(content(readFileSync(exportFile, 'utf8')));
        const store = openStore(url);
        try {
          expect(await authenticate(store.db, seed.analystKey)).toMatchObject({
            organisation_id: organisationId,
            role: 'analyst',
          });
        } finally {
          await store.close();
        }
      } finally {
        await dropTestDatabase(url);
      }
    });
  }

  /** A target that already holds the organisation, to show refusals store nothing. */
  const targetUrl = `sqlite:${folder.path('refusing.sqlite')}`;
  const file = (name: string, change: (document: any) => void): string => {
    const original = readFileSync(exportFile, 'utf8');
    const document = JSON.parse(original);
    change(document);
    const text = JSON.stringify(document);
    if (`${text}\n` === original) throw new Error(`${name}: the edit changed nothing`);
    return folder.write(name, text);
  };

  const bad: { what: string; args: () => string[]; says: RegExp | (() => RegExp) }[] = [
    { what: 'without --in', args: () => ['import'], says: /^mvledger: --in FILE is required/ },
    {
      what: 'a file that cannot be read',
      args: () => ['import', '--in', folder.path('nowhere.json')],
      says: /^mvledger: --in .*nowhere\.json: cannot read it \(ENOENT\)\n$/,
    },
    {
      what: 'a file that is not JSON',
      args: () => ['import', '--in', folder.write('broken.json', '{"format": "mvledger-export",')],
      says: /^mvledger: .*broken\.json: not a JSON document/,
    },
    {
      what: 'another format',
      args: () => ['import', '--in', file('format.json', (d) => (d.format = 'ledger-dump'))],
      says: /^mvledger: .*format\.json: format: must be "mvledger-export", got "ledger-dump"\n$/,
    },
    {
      what: 'an edited audit row',
      args: () => [
        'import',
        '--in',
        file(
          'tampered.json',
          (d) => (d.tables.audit_log[2].after_json = d.tables.audit_log[2].after_json.replace('demo', 'DEMO')),
        ),
      ],
      says: /^mvledger: .*tampered\.json: tables\.audit_log\[2\]: the audit chain breaks at seq 3: its content does not match its hash/,
    },
    {
      what: 'an organisation the target already holds',
      args: () => ['import', '--in', exportFile],
      says: () =>
        new RegExp(
          `^mvledger: .*export\\.json: organisation ${organisationId} already exists in the target database\n$`,
        ),
    },
  ];

  describe('refusals', () => {
    beforeAll(async () => {
      const first = await cli(targetUrl, ['import', '--in', exportFile]);
      expect(first.code, first.stderr).toBe(0);
    });

    for (const c of bad) {
      it(`refuses ${c.what} with exit 2 and one line, storing nothing`, async () => {
        const args = c.args();
        const before = await digestOf(targetUrl);
        const run = await cli(targetUrl, args);
        expect(run.code).toBe(2); // contract: bad input exits 2
        expect(run.stdout).toBe('');
        expect(run.stderr).toMatch(typeof c.says === 'function' ? c.says() : c.says);
        expect(run.stderr.trimEnd().split('\n')).toHaveLength(1);
        expect(await digestOf(targetUrl)).toBe(before);
      });
    }
  });

  it('answers an internal failure with exit 1 and stores nothing', async () => {
    const url = `sqlite:${folder.path('failing.sqlite')}`;
    const store = openStore(url);
    try {
      await migrateToLatest(store.db);
      // synthetic: the test makes the target refuse audit rows, the last table inserted
      await sql`create trigger refuse_audit before insert on audit_log begin select raise(abort, 'synthetic failure'); end`.execute(
        store.db,
      );
    } finally {
      await store.close();
    }
    const before = await digestOf(url);
    const run = await cli(url, ['import', '--in', exportFile]);
    expect(run.code).toBe(1); // contract: an internal failure exits 1
    expect(run.stderr).toMatch(/^mvledger: internal error: .*synthetic failure/);
    expect(await digestOf(url)).toBe(before);
  });

  it('prints its usage for --help and `help import`', async () => {
    for (const args of [
      ['import', '--help'],
      ['help', 'import'],
      ['export', '-h'],
    ]) {
      const run = await runCli(args);
      expect(run.code).toBe(0);
      expect(run.stdout).toMatch(/^Usage: mvledger (import --in FILE|export --org ID)/);
    }
  });
});
