/**
 * Export and import of one organisation (src/store/transfer.ts), round-tripping
 * the invented demo district: seeded through the API into a SQLite file,
 * exported, and imported into a fresh SQLite file, and into a fresh
 * PostgreSQL schema when the tests run on PostgreSQL.
 *
 * Check values: the source database itself (synthetic: the demo sets the
 * truth): every row, the audit head and every savings body of the target
 * must equal the source's. Rejections are the module's contract (a
 * TransferInputError naming the place; nothing stored, shown by
 * databaseDigest).
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { sql, type Kysely } from 'kysely';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runDemo, type DemoSeed } from '../../src/demo/main.js';
import { buildApp } from '../../src/http/app.js';
import { canonicalJson } from '../../src/lib/canonical-json.js';
import { verifyBaselineContent } from '../../src/store/baseline-content.js';
import { authenticate } from '../../src/store/api-keys.js';
import { verifyAuditChain } from '../../src/store/audit.js';
import { openStore, type Store } from '../../src/store/connect.js';
import { migrateToLatest } from '../../src/store/migrate.js';
import type { Database } from '../../src/store/schema.js';
import {
  TRANSFER_TABLES,
  TransferInputError,
  checkDocument,
  exportOrganisation,
  importOrganisation,
  type ExportDocument,
} from '../../src/store/transfer/index.js';
import { dropTestDatabase, freshTestDatabaseUrl, testDialect } from '../support/database.js';
import { databaseDigest } from '../support/db-digest.js';

const EXPORTED_AT = '2031-02-03T04:05:06.000Z'; // synthetic: the test sets the truth

/** Primary key of every table the export carries (migrations/0001_ledger.ts). */
const TABLE_KEYS = {
  organisations: ['id'],
  api_keys: ['id'],
  weather_stations: ['id'],
  weather_observations: ['station_id', 'date'],
  facilities: ['id'],
  meters: ['id'],
  readings: ['meter_id', 'period_start', 'period_end'],
  baselines: ['id'],
  audit_log: ['organisation_id', 'seq'],
} as const;

/** Every row of a table as canonical JSON, ordered by key (read with plain SQL, not through the module under test). */
async function tableRows(db: Kysely<Database>, table: keyof typeof TABLE_KEYS): Promise<string[]> {
  const { rows } = await sql<Record<string, unknown>>`select * from ${sql.table(table)}`.execute(db);
  return rows
    .map((row) => ({ key: canonicalJson(TABLE_KEYS[table].map((column) => row[column])), text: canonicalJson(row) }))
    .sort((a, b) => (a.key < b.key ? -1 : a.key > b.key ? 1 : 0))
    .map((row) => row.text);
}

/** The document as it travels: through JSON text. */
function asFile(document: ExportDocument): unknown {
  return JSON.parse(JSON.stringify(document));
}

/** A deep copy of the document with one change made to it. */
/** The tables of format version 6 (migration 0006): an older document has none. */
function withoutTablesOfVersion6(d: any): void {
  for (const table of ['variables', 'variable_values', 'facility_calendars']) delete d.tables[table];
}

function edited(document: ExportDocument, change: (copy: any) => void): unknown {
  const copy = asFile(document);
  change(copy);
  return copy;
}

const folder = mkdtempSync(join(tmpdir(), 'mvledger-transfer-'));
let source: Store;
let seed: DemoSeed;
let organisationId: string;
let document: ExportDocument;

beforeAll(async () => {
  ({ seed } = await runDemo({ seedOnly: true, databaseFile: join(folder, 'source.sqlite'), port: 0, print: () => {} }));
  source = openStore(`sqlite:${join(folder, 'source.sqlite')}`);
  const organisations = await source.db.selectFrom('organisations').select('id').execute();
  expect(organisations).toHaveLength(1); // synthetic: the demo makes one organisation
  organisationId = organisations[0]!.id;
  document = await exportOrganisation(source.db, organisationId, EXPORTED_AT);
}, 60_000);

afterAll(async () => {
  await source?.close();
  rmSync(folder, { recursive: true, force: true });
});

/** The contract columns of format version 4 (migration 0005). */
const CONTRACT_COLUMNS_SINCE_4 = ['reference', 'parties_json', 'mv_plan_reference', 'mv_option', 'confidence'];

describe('exportOrganisation', () => {
  it('writes format mvledger-export version 6 with every table of the organisation and no idempotency keys', async () => {
    expect(document.format).toBe('mvledger-export'); // the format's own contract
    expect(document.version).toBe(6);
    expect(document.exportedAt).toBe(EXPORTED_AT);
    expect(Object.keys(document.tables)).toEqual([...TRANSFER_TABLES]);
    expect(document.organisation).toEqual(
      await source.db.selectFrom('organisations').selectAll().executeTakeFirstOrThrow(),
    );
    for (const table of TRANSFER_TABLES) {
      // The source holds one organisation, so its whole tables are the organisation's rows.
      const { count } = await source.db
        .selectFrom(table)
        .select((eb) => eb.fn.countAll<number>().as('count'))
        .executeTakeFirstOrThrow();
      expect(document.tables[table], table).toHaveLength(Number(count));
    }
  });

  it('keeps every value exactly as stored, ordered by primary key, and states the audit head', async () => {
    const audit = await verifyAuditChain(source.db, organisationId);
    expect(document.auditHead).toEqual({ seq: audit.headSeq, hash: audit.headHash });
    expect(document.tables.audit_log.map((row) => row.seq)).toEqual(
      Array.from({ length: audit.headSeq }, (_, i) => i + 1),
    );
    const readings = (await tableRows(source.db, 'readings')).map((text) => JSON.parse(text));
    expect(document.tables.readings).toEqual(readings);
    const baseline = await source.db
      .selectFrom('baselines')
      .selectAll()
      .where('id', '=', seed.facilities[0]!.meters[0]!.baselineId)
      .executeTakeFirstOrThrow();
    expect(document.tables.baselines.find((row) => row.id === baseline.id)).toEqual(baseline);
  });

  it('gives the same text twice, and refuses an unknown organisation', async () => {
    expect(JSON.stringify(await exportOrganisation(source.db, organisationId, EXPORTED_AT))).toBe(
      JSON.stringify(document),
    );
    await expect(exportOrganisation(source.db, 'org_missing', EXPORTED_AT)).rejects.toThrow(TransferInputError);
  });
});

describe('checkDocument refuses a document that is not a faithful export', () => {
  const cases: { what: string; change: (copy: any) => void; says: RegExp }[] = [
    { what: 'another format', change: (d) => (d.format = 'ledger-dump'), says: /^format: must be "mvledger-export"/ },
    {
      what: 'another version',
      change: (d) => (d.version = 7),
      says: /^version: this mvledger reads versions 1, 2, 3, 4, 5 and 6, got 7/,
    },
    {
      what: 'a version 1 document with a table of version 2',
      change: (d) => (d.version = 1),
      says: /^tables\.normal_years: not a table of format version 1/,
    },
    {
      what: 'an edited audit row',
      change: (d) => (d.tables.audit_log[4].actor = 'someone else'),
      says: /^tables\.audit_log\[4\]: the audit chain breaks at seq 5: its content does not match its hash/,
    },
    {
      what: 'a removed audit row',
      change: (d) => d.tables.audit_log.splice(2, 1),
      says: /^tables\.audit_log\[2\]: the audit chain breaks at seq 4: row 3 is missing/,
    },
    {
      what: 'a cut-off audit tail',
      change: (d) => d.tables.audit_log.pop(),
      says: /^auditHead: the audit chain ends at seq \d+ with hash [0-9a-f]{64}, not at the stated seq/,
    },
    {
      what: 'an edited frozen baseline',
      change: (d) =>
        (d.tables.baselines[0].inputs_json = d.tables.baselines[0].inputs_json.replace(
          /"quantity":(\d)/,
          '"quantity":9$1',
        )),
      says: /^tables\.baselines\[0\]: baseline bsl_\S+ \((frozen|superseded)\) does not match its content hash/,
    },
    {
      what: 'a missing column',
      change: (d) => delete d.tables.readings[3].cost,
      says: /^tables\.readings\[3\]\.cost: missing/,
    },
    {
      what: 'an unknown column',
      change: (d) => (d.tables.meters[0].colour = 'red'),
      says: /^tables\.meters\[0\]\.colour: not a column of format version 6/,
    },
    {
      what: 'a version 2 document with a column of version 3',
      change: (d) => {
        d.version = 2;
        withoutTablesOfVersion6(d);
        delete d.tables.statements;
        delete d.tables.statement_copies;
        for (const row of d.tables.contracts) for (const column of CONTRACT_COLUMNS_SINCE_4) delete row[column];
        for (const row of d.tables.weather_observations)
          for (const column of ['fill_method', 'fill_note']) delete row[column];
      },
      says: /^tables\.adjustments\[0\]\.uncertainty: not a column of format version 2/,
    },
    {
      what: 'a version 4 document with a column of version 5',
      change: (d) => {
        d.version = 4;
        withoutTablesOfVersion6(d);
        withoutTablesOfVersion6(d);
      },
      says: /^tables\.weather_observations\[0\]\.fill_method: not a column of format version 4/,
    },
    {
      what: 'a frozen baseline whose temperature form was edited',
      change: (d) => (d.tables.baselines[0].temperature_form = 'mean'),
      says: /^tables\.baselines\[0\]: baseline bsl_\S+ \((frozen|superseded)\) does not match its content hash/,
    },
    {
      what: 'an override added to a frozen baseline',
      change: (d) => (d.tables.baselines[0].extrapolation_override = 'added later'),
      says: /^tables\.baselines\[0\]: baseline bsl_\S+ \((frozen|superseded)\) does not match its content hash/,
    },
    {
      what: 'an unknown temperature form',
      change: (d) => (d.tables.baselines[0].temperature_form = 'weekly'),
      says: /^tables\.baselines\[0\]\.temperature_form: must be one of daily, mean/,
    },
    {
      what: 'a negative adjustment uncertainty',
      change: (d) => (d.tables.adjustments[0].uncertainty = -5),
      says: /^tables\.adjustments\[0\]\.uncertainty: must be at least 0, got -5/,
    },
    {
      what: 'a quantity as text',
      change: (d) => (d.tables.readings[0].quantity = '12'),
      says: /^tables\.readings\[0\]\.quantity: must be a finite number, got "12"/,
    },
    {
      what: 'an unknown role',
      change: (d) => (d.tables.api_keys[0].role = 'root'),
      says: /^tables\.api_keys\[0\]\.role: must be one of admin, engineer, analyst, integration/,
    },
    {
      what: 'a row of another organisation',
      change: (d) => (d.tables.facilities[1].organisation_id = 'org_other'),
      says: /^tables\.facilities\[1\]\.organisation_id: must be the exported organisation/,
    },
    {
      what: 'a reading of a meter not in the document',
      change: (d) => (d.tables.readings[0].meter_id = 'mtr_elsewhere'),
      says: /^tables\.readings\[0\]\.meter_id: "mtr_elsewhere" is not a meter in the document/,
    },
    {
      what: 'a duplicated reading',
      change: (d) => d.tables.readings.push(d.tables.readings[0]),
      says: /^tables\.readings\[\d+\]: a second row with the key meter_id, period_start, period_end/,
    },
    {
      what: 'idempotency keys',
      change: (d) => (d.tables.idempotency_keys = []),
      says: /^tables\.idempotency_keys: not a table of format version 6/,
    },
    // Keys must have been issued on the audit trail (issue 17 item 4): a hand-added admin key is refused by its id.
    {
      what: 'an admin key with no audit record of its issue',
      change: (d) =>
        d.tables.api_keys.push({ ...d.tables.api_keys[0], id: 'Zz9Zz9Zz', role: 'admin', revoked_at: null }),
      says: /^tables\.api_keys\[\d+\]: key Zz9Zz9Zz has no audit record of its issue/,
    },
    {
      what: 'a key whose role was raised after its issue',
      change: (d) => {
        const index = d.tables.api_keys.findIndex((k: any) => k.role !== 'admin');
        d.tables.api_keys[index].role = 'admin';
      },
      says: /^tables\.api_keys\[\d+\]: key \S+ has no audit record of its issue with this name, role and time/,
    },
    {
      what: 'a key revoked with no audit record of its revocation',
      change: (d) => (d.tables.api_keys[0].revoked_at = '2031-01-01T00:00:00.000Z'),
      says: /^tables\.api_keys\[0\]\.revoked_at: key \S+ has no audit record of its revocation/,
    },
    {
      what: 'a missing table',
      change: (d) => delete d.tables.baselines,
      says: /^tables\.baselines: must be a list of rows, got nothing/,
    },
    // The API's own rules on each row (src/store/transfer-rules.ts), not only the column types.
    {
      what: 'an adjustment with both quantity and perDay',
      change: (d) => Object.assign(d.tables.adjustments[0], { quantity: 10, per_day: 5 }),
      says: /^tables\.adjustments\[0\]\.quantity: exactly one of quantity and perDay must be set/,
    },
    {
      what: 'an adjustment with neither quantity nor perDay',
      change: (d) => Object.assign(d.tables.adjustments[0], { quantity: null, per_day: null }),
      says: /^tables\.adjustments\[0\]\.quantity: exactly one of quantity and perDay must be set/,
    },
    {
      what: 'an adjustment ending before it starts',
      change: (d) => (d.tables.adjustments[0].period_end = '2000-01-01'),
      says: /^tables\.adjustments\[0\]\.period_end: end 2000-01-01 is not after start/,
    },
    {
      what: 'a reading ending where it starts',
      change: (d) => (d.tables.readings[2].period_end = d.tables.readings[2].period_start),
      says: /^tables\.readings\[2\]\.period_end: /,
    },
    {
      what: 'a negative reading',
      change: (d) => (d.tables.readings[2].quantity = -1),
      says: /^tables\.readings\[2\]\.quantity: negative/,
    },
  ];
  it('still reads a version 1 document (from before adjustments, rates, contracts and normal years), with those tables empty', () => {
    const input = edited(document, (d) => {
      d.version = 1;
      withoutTablesOfVersion6(d);
      for (const table of ['adjustments', 'rates', 'contracts', 'normal_years', 'statements', 'statement_copies'])
        delete d.tables[table];
      for (const table of ['adjustments', 'rates', 'contracts', 'normal_years']) delete d.tables[table];
      for (const row of d.tables.weather_observations)
        for (const column of ['fill_method', 'fill_note']) delete row[column];
    });
    for (const row of (input as any).tables.baselines)
      for (const column of ['temperature_form', 'short_baseline_override', 'extrapolation_override'])
        delete row[column];
    const checked = checkDocument(input);
    expect(checked.version).toBe(6);
    expect(checked.tables.rates).toEqual([]);
    expect(checked.tables.statements).toEqual([]);
    expect(checked.tables.readings).toHaveLength(document.tables.readings.length);
    expect(checked.tables.baselines).toEqual(document.tables.baselines); // the columns of version 3 defaulted as below
  });

  it('still reads a version 2 document, taking each baseline’s form from its fit document and no override or adjustment ±', () => {
    const input = edited(document, (d) => {
      d.version = 2;
      withoutTablesOfVersion6(d);
      delete d.tables.statements;
      delete d.tables.statement_copies;
      for (const row of d.tables.contracts) for (const column of CONTRACT_COLUMNS_SINCE_4) delete row[column];
      for (const row of d.tables.weather_observations)
        for (const column of ['fill_method', 'fill_note']) delete row[column];
      for (const row of d.tables.baselines)
        for (const column of ['temperature_form', 'short_baseline_override', 'extrapolation_override'])
          delete row[column];
      for (const row of d.tables.adjustments) delete row.uncertainty;
    });
    const checked = checkDocument(input);
    expect(checked.version).toBe(6);
    // The demo's baselines are day-resolved (its bills have daily weather) and carry no override: the source's own rows.
    expect(checked.tables.baselines.map((row) => row.temperature_form)).toEqual(
      document.tables.baselines.map(() => 'daily'),
    );
    expect(checked.tables.baselines).toEqual(document.tables.baselines);
    expect(checked.tables.adjustments.map((row) => row.uncertainty)).toEqual(
      document.tables.adjustments.map(() => null),
    );
  });

  it('still reads a version 3 document (from before statements), each contract with no identification and the 90% default', () => {
    const input = edited(document, (d) => {
      d.version = 3;
      withoutTablesOfVersion6(d);
      delete d.tables.statements;
      delete d.tables.statement_copies;
      for (const row of d.tables.contracts) for (const column of CONTRACT_COLUMNS_SINCE_4) delete row[column];
      for (const row of d.tables.weather_observations)
        for (const column of ['fill_method', 'fill_note']) delete row[column];
    });
    const checked = checkDocument(input);
    expect(checked.version).toBe(6);
    expect(checked.tables.statements).toEqual([]);
    expect(checked.tables.statement_copies).toEqual([]);
    for (const row of checked.tables.contracts)
      expect(row).toMatchObject({
        reference: null,
        parties_json: '[]',
        mv_plan_reference: null,
        mv_option: null,
        confidence: 0.9,
      });
  });

  it('refuses a version 3 document that carries statements', () => {
    const input = edited(document, (d) => {
      d.version = 3;
      withoutTablesOfVersion6(d);
      for (const row of d.tables.contracts) for (const column of CONTRACT_COLUMNS_SINCE_4) delete row[column];
      for (const row of d.tables.weather_observations)
        for (const column of ['fill_method', 'fill_note']) delete row[column];
    });
    expect(() => checkDocument(input)).toThrow(/^tables\.statements: not a table of format version 3/);
  });

  it('still reads a version 4 document, every weather day of it observed', () => {
    const input = edited(document, (d) => {
      d.version = 4;
      withoutTablesOfVersion6(d);
      for (const row of d.tables.weather_observations)
        for (const column of ['fill_method', 'fill_note']) delete row[column];
    });
    const checked = checkDocument(input);
    expect(checked.version).toBe(6);
    expect(checked.tables.weather_observations.length).toBeGreaterThan(0);
    expect(checked.tables.weather_observations.every((row) => row.fill_method === null && row.fill_note === null)).toBe(
      true,
    );
  });

  it('still reads a version 5 document, with no variables or calendars', () => {
    const input = edited(document, (d) => {
      d.version = 5;
      withoutTablesOfVersion6(d);
    });
    const checked = checkDocument(input);
    expect(checked.version).toBe(6);
    expect(checked.tables.variables).toEqual([]);
    expect(checked.tables.variable_values).toEqual([]);
    expect(checked.tables.facility_calendars).toEqual([]);
  });

  it('refuses a version 5 document that carries the tables of variables and calendars', () => {
    const input = edited(document, (d) => (d.version = 5));
    expect(() => checkDocument(input)).toThrow(/^tables\.facility_calendars: not a table of format version 5/);
  });

  for (const c of cases) {
    it(`refuses ${c.what}`, () => {
      const input = edited(document, c.change);
      expect(() => checkDocument(input)).toThrow(TransferInputError);
      expect(() => checkDocument(input)).toThrow(c.says);
    });
  }

  it('accepts the export itself', () => {
    expect(checkDocument(asFile(document))).toEqual(document);
  });
});

interface Target {
  name: string;
  url: () => string;
}

const targets: Target[] = [
  { name: 'a fresh SQLite file', url: () => `sqlite:${join(folder, 'target.sqlite')}` },
  ...(testDialect() === 'postgres' ? [{ name: 'a fresh PostgreSQL schema', url: freshTestDatabaseUrl }] : []),
];

for (const target of targets) {
  describe(`importOrganisation into ${target.name}`, () => {
    let url: string;
    let store: Store;

    beforeAll(async () => {
      url = target.url();
      store = openStore(url);
      await migrateToLatest(store.db);
      const summary = await importOrganisation(store.db, asFile(document));
      expect(summary.auditHead).toEqual(document.auditHead);
    });

    afterAll(async () => {
      await store?.close();
      await dropTestDatabase(url);
    });

    it('holds every row of the source, value for value', async () => {
      // Idempotency keys are left out on purpose (transient); the demo makes none.
      for (const table of Object.keys(TABLE_KEYS) as (keyof typeof TABLE_KEYS)[]) {
        const expected = await tableRows(source.db, table);
        const actual = await tableRows(store.db, table);
        expect(actual.length, table).toBe(expected.length);
        expect(actual, table).toEqual(expected);
      }
    });

    it('verifies the audit chain to the same head and every frozen baseline', async () => {
      const verdict = await verifyAuditChain(store.db, organisationId);
      expect(verdict).toMatchObject({ ok: true, headSeq: document.auditHead.seq, headHash: document.auditHead.hash });
      const frozen = await store.db.selectFrom('baselines').selectAll().where('status', '=', 'frozen').execute();
      expect(frozen).toHaveLength(7); // synthetic: the demo freezes one baseline per meter, seven meters (src/demo/scenario.ts)
      for (const row of frozen) expect(verifyBaselineContent(row), row.id).toBe(true);
    });

    it('lets the source’s keys in, and answers every meter’s savings byte for byte as the source does', async () => {
      expect(await authenticate(store.db, seed.analystKey)).toMatchObject({
        organisation_id: organisationId,
        role: 'analyst',
      });
      const targetApp = await buildApp({ store });
      const sourceApp = await buildApp({ store: source });
      try {
        for (const meter of seed.facilities.flatMap((f) => f.meters)) {
          const request = {
            method: 'GET' as const,
            url: `/v1/meters/${meter.id}/savings?confidence=0.9`,
            headers: { authorization: `Bearer ${seed.analystKey}` },
          };
          // The target first: frozen models are cached in memory by baseline id and content hash.
          const fromTarget = await targetApp.inject(request);
          const fromSource = await sourceApp.inject(request);
          expect(fromTarget.statusCode, meter.id).toBe(200);
          expect(fromTarget.body, meter.id).toBe(fromSource.body);
        }
      } finally {
        await targetApp.close();
        await sourceApp.close();
      }
    });

    it('refuses the same organisation a second time and stores nothing', async () => {
      const before = await databaseDigest(store.db);
      await expect(importOrganisation(store.db, asFile(document))).rejects.toThrow(
        new RegExp(`^organisation ${organisationId} already exists in the target database$`),
      );
      expect(await databaseDigest(store.db)).toBe(before);
    });
  });
}

describe('importOrganisation stores all or nothing', () => {
  it('refuses an id another organisation of the target already uses', async () => {
    const store = openStore(`sqlite:${join(folder, 'taken.sqlite')}`);
    try {
      await migrateToLatest(store.db);
      const facility = document.tables.facilities[0]!;
      await store.db
        .insertInto('organisations')
        .values({ id: 'org_other', name: 'Other (invented)', created_at: EXPORTED_AT })
        .execute();
      await store.db
        .insertInto('facilities')
        .values({
          id: facility.id as string,
          organisation_id: 'org_other',
          name: 'Same id',
          address: null,
          floor_area: null,
          created_at: EXPORTED_AT,
        })
        .execute();
      const before = await databaseDigest(store.db);
      await expect(importOrganisation(store.db, asFile(document))).rejects.toThrow(
        `facilities id ${facility.id} already exists in the target database`,
      );
      expect(await databaseDigest(store.db)).toBe(before);
    } finally {
      await store.close();
    }
  });

  it('rolls every insert back when the last table fails', async () => {
    const store = openStore(`sqlite:${join(folder, 'failing.sqlite')}`);
    try {
      await migrateToLatest(store.db);
      // synthetic: the test makes the target refuse audit rows, the last table inserted
      await sql`create trigger refuse_audit before insert on audit_log begin select raise(abort, 'synthetic failure'); end`.execute(
        store.db,
      );
      const before = await databaseDigest(store.db);
      const failure = await importOrganisation(store.db, asFile(document)).catch((error: unknown) => error);
      expect(failure).toBeInstanceOf(Error);
      expect(failure).not.toBeInstanceOf(TransferInputError);
      expect(String(failure)).toContain('synthetic failure');
      expect(await databaseDigest(store.db)).toBe(before);
      expect(await store.db.selectFrom('readings').select('meter_id').execute()).toHaveLength(0);
    } finally {
      await store.close();
    }
  });
});
