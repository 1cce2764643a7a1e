/**
 * Signed audit checkpoints: the service signs the audit head with an Ed25519
 * key held outside the database, on request and on every issued statement
 * (whose copies carry the checkpoint of the head their figures were read
 * at); an outsider with the public key, an export and a checkpoint proves
 * the trail was neither rewritten nor cut since. Check values: Ed25519
 * (RFC 8032) through node:crypto, the service's own writes (synthetic data,
 * the test sets the truth), and the tampering each case does.
 */
import { generateKeyPairSync } from 'node:crypto';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runVerify, EXIT_VERIFY_FAILED } from '../../src/cli/commands/verify.js';
import { loadConfig } from '../../src/config.js';
import {
  checkpointSigner,
  checkpointSignatureFault,
  type SignedCheckpoint,
} from '../../src/lib/checkpoint-signature.js';
import { sha256Hex, canonicalJson } from '../../src/lib/canonical-json.js';
import { signEveryAuditHead } from '../../src/services/audit-checkpoints.js';
import { GENESIS_HASH } from '../../src/store/audit.js';
import { proveAgainstCheckpoints } from '../../src/store/checkpoint-proof.js';
import type { AuditRow } from '../../src/store/schema.js';
import { exportOrganisation } from '../../src/store/transfer/index.js';
import { makeTestApi, type TestApi } from '../support/api.js';
import { CLIMATES, SAMPLE_BUILDING, dailyWeather, monthlyReadings, seededRandom } from '../support/synthetic.js';

// synthetic: the test sets the truth. 24 baseline bills, then 6 reporting bills.
const random = seededRandom(23);
const WEATHER = dailyWeather(CLIMATES.temperate, '2023-01-01', 920, random);
const BILLS = monthlyReadings(SAMPLE_BUILDING, WEATHER, '2023-01-01', 30, random);

const pem = (kind: 'public' | 'private', key: ReturnType<typeof generateKeyPairSync>) =>
  (kind === 'public' ? key.publicKey : key.privateKey)
    .export({ type: kind === 'public' ? 'spki' : 'pkcs8', format: 'pem' })
    .toString();
const KEYS = generateKeyPairSync('ed25519');
const OTHER_KEYS = generateKeyPairSync('ed25519');
const signer = checkpointSigner(pem('private', KEYS));

let api: TestApi;
let folder: string;

async function ok(method: 'GET' | 'POST' | 'PUT', path: string, body?: unknown) {
  const response = await api.call(method, path, body === undefined ? {} : { body });
  expect(response.status, `${method} ${path}: ${response.text}`).toBeLessThan(300);
  return response.json;
}

/** Rewrite the chain from row `from` on as someone with database access could: one row edited, every later hash recomputed. */
function rewritten(rows: AuditRow[], from: number): AuditRow[] {
  const out: AuditRow[] = [];
  let prev = GENESIS_HASH;
  for (const row of rows) {
    if (row.seq < from) {
      out.push(row);
      prev = row.hash;
      continue;
    }
    const edited = row.seq === from ? { ...row, actor: 'someone else' } : row;
    const hash = sha256Hex(
      `${prev}\n${canonicalJson({
        seq: edited.seq,
        organisation_id: edited.organisation_id,
        actor: edited.actor,
        at: edited.at,
        action: edited.action,
        entity_type: edited.entity_type,
        entity_id: edited.entity_id,
        before_json: edited.before_json,
        after_json: edited.after_json,
      })}`,
    );
    out.push({ ...edited, prev_hash: prev, hash });
    prev = hash;
  }
  return out;
}

beforeAll(async () => {
  folder = mkdtempSync(join(tmpdir(), 'mvl-checkpoints-'));
  api = await makeTestApi({ checkpointSigner: signer });
  const stationId = (
    await ok('POST', '/v1/weather-stations', { name: 'Invented valley station', temperatureUnit: 'F' })
  ).id;
  await ok('PUT', `/v1/weather-stations/${stationId}/observations`, {
    observations: WEATHER.map((d) => ({ date: d.date, temp: d.temp })),
  });
  const facilityId = (await ok('POST', '/v1/facilities', { name: 'Checkpoint test school (invented)' })).id;
  const meterId = (
    await ok('POST', `/v1/facilities/${facilityId}/meters`, {
      name: 'School gas (invented)',
      fuel: 'natural-gas',
      unit: 'therm',
      weatherStationId: stationId,
    })
  ).id;
  await ok('POST', `/v1/meters/${meterId}/readings`, {
    readings: BILLS.map((r) => ({ start: r.start, end: r.end, quantity: r.quantity })),
  });
  const draft = await ok('POST', `/v1/meters/${meterId}/baselines`, { start: '2023-01-01', end: '2025-01-01' });
  await ok('POST', `/v1/baselines/${draft.id}/freeze`, { note: 'Agreed (test)' });
});
afterAll(async () => {
  await api?.close();
  rmSync(folder, { recursive: true, force: true });
});

describe('the signature', () => {
  it('verifies under the signing key only, and not once any signed field changes', () => {
    const claim = { organisationId: 'org_x', seq: 7, headHash: 'a'.repeat(64), signedAt: '2026-01-01T00:00:00.000Z' };
    const signed = signer.sign(claim);
    expect(signed.signature).toMatch(/^[A-Za-z0-9+/]{86}==$/); // 64 bytes, base64 (RFC 8032 §5.1.6)
    expect(checkpointSignatureFault(signed, pem('public', KEYS))).toBeNull();
    expect(checkpointSignatureFault(signed, pem('public', OTHER_KEYS))).toMatch(
      /^it was signed by key [0-9a-f]{16}, not by this public key/,
    );
    for (const change of [
      { seq: 8 },
      { headHash: 'b'.repeat(64) },
      { signedAt: '2026-01-02T00:00:00.000Z' },
      { organisationId: 'org_y' },
    ])
      expect(checkpointSignatureFault({ ...signed, ...change }, pem('public', KEYS))).toBe(
        'its signature does not verify',
      );
  });

  it('takes its key from the configuration, refusing what is not an Ed25519 private key without repeating it', () => {
    const file = join(folder, 'checkpoint.pem');
    writeFileSync(file, pem('private', KEYS));
    expect(loadConfig({ MVLEDGER_CHECKPOINT_KEY_FILE: file }).checkpointSigner?.keyId).toBe(signer.keyId);
    expect(loadConfig({ MVLEDGER_CHECKPOINT_KEY: pem('private', KEYS) }).checkpointSigner?.keyId).toBe(signer.keyId);
    expect(loadConfig({}).checkpointSigner).toBeUndefined();
    expect(() => loadConfig({ MVLEDGER_CHECKPOINT_KEY: 'not-a-key-secret-words' })).toThrow(
      'invalid configuration: MVLEDGER_CHECKPOINT_KEY: the checkpoint key is not a PEM private key',
    );
    const rsa = generateKeyPairSync('rsa', { modulusLength: 1024 })
      .privateKey.export({ type: 'pkcs8', format: 'pem' })
      .toString();
    expect(() => loadConfig({ MVLEDGER_CHECKPOINT_KEY: rsa })).toThrow('the checkpoint key must be Ed25519 (got rsa)');
    expect(() => loadConfig({ MVLEDGER_CHECKPOINT_KEY_FILE: join(folder, 'missing.pem') })).toThrow(
      'MVLEDGER_CHECKPOINT_KEY_FILE: cannot read the file (ENOENT)',
    );
  });
});

describe('checkpoints over HTTP', () => {
  it('signs the head on request, once per head, and lists the checkpoints with the public key', async () => {
    const head = (await ok('GET', '/v1/audit/verify')).headSeq as number;
    const first = await ok('POST', '/v1/audit/checkpoints');
    expect(first).toMatchObject({
      organisationId: api.organisationId,
      seq: head,
      keyId: signer.keyId,
      reason: 'request',
    });
    expect(await ok('POST', '/v1/audit/checkpoints')).toEqual(first); // the head has not moved: nothing new is signed
    const listed = await ok('GET', '/v1/audit/checkpoints');
    expect(listed.publicKey).toEqual({ keyId: signer.keyId, pem: pem('public', KEYS) });
    expect(listed.checkpoints).toEqual([first]);
    expect((await api.call('POST', '/v1/audit/checkpoints', { as: 'integration' })).status).toBe(403);
    expect((await api.call('GET', '/v1/audit/checkpoints', { as: 'other' })).json.checkpoints).toEqual([]);
  });

  it('signs on every issued statement: the copy carries the checkpoint of the head its figures were read at', async () => {
    const issued = await ok('POST', '/v1/statements', { window: { quarter: '2025-Q1' } });
    const document = await ok('GET', `/v1/statements/${issued.id}/document?format=json`);
    const checkpoint: SignedCheckpoint = document.statement.checkpoint;
    expect(checkpoint.seq).toBe(document.report.dataAsOf.auditSeq);
    expect(checkpoint.headHash).toBe(document.report.dataAsOf.auditHash);
    expect(checkpointSignatureFault(checkpoint, pem('public', KEYS))).toBeNull();
    const html = (await api.call('GET', `/v1/statements/${issued.id}/document?format=html`)).text;
    expect(html).toContain(`audit checkpoint: sequence ${checkpoint.seq} hash ${checkpoint.headHash}`);
    // The head after the issue row is signed too.
    const listed = (await ok('GET', '/v1/audit/checkpoints')).checkpoints as SignedCheckpoint[];
    expect(listed.at(-1)!.seq).toBe((await ok('GET', '/v1/audit/verify')).headSeq);
    writeFileSync(join(folder, 'statement.json'), JSON.stringify(document));
    writeFileSync(join(folder, 'checkpoints.json'), JSON.stringify(await ok('GET', '/v1/audit/checkpoints')));
  });

  it('signs, in the periodic round, only organisations whose head moved', async () => {
    await ok('POST', '/v1/facilities', { name: 'Annex (invented)' });
    // organisation A moved; B never had a checkpoint, so it is signed once
    expect(await signEveryAuditHead(api.store.db, signer, new Date().toISOString())).toBe(2);
    expect(await signEveryAuditHead(api.store.db, signer, new Date().toISOString())).toBe(0);
  });

  it('refuses a request to sign when the service holds no key', async () => {
    const plain = await makeTestApi();
    try {
      const response = await plain.call('POST', '/v1/audit/checkpoints');
      expect(response.status).toBe(422);
      expect(response.json.detail).toContain('MVLEDGER_CHECKPOINT_KEY_FILE');
      expect((await plain.call('GET', '/v1/audit/checkpoints')).json).toMatchObject({
        publicKey: null,
        checkpoints: [],
      });
    } finally {
      await plain.close();
    }
  });
});

describe('the outsider’s proof, from an export, the public key and a checkpoint', () => {
  let rows: AuditRow[];
  let checkpoints: SignedCheckpoint[];

  beforeAll(async () => {
    const document = await exportOrganisation(api.store.db, api.organisationId, new Date().toISOString());
    rows = document.tables.audit_log as unknown as AuditRow[];
    checkpoints = (await ok('GET', '/v1/audit/checkpoints')).checkpoints;
    writeFileSync(join(folder, 'export.json'), JSON.stringify(document));
    writeFileSync(join(folder, 'public.pem'), pem('public', KEYS));
    writeFileSync(join(folder, 'other.pem'), pem('public', OTHER_KEYS));
  });

  it('holds for the trail as it is', () => {
    const proof = proveAgainstCheckpoints(api.organisationId, rows, checkpoints, pem('public', KEYS));
    expect(proof.ok).toBe(true);
    expect(proof.checkpoints.every((c) => c.ok)).toBe(true);
  });

  it('catches a trail rewritten with recomputed hashes, which still verifies as a chain', () => {
    const target = checkpoints[0]!.seq - 2;
    const forged = rewritten(rows, target);
    const proof = proveAgainstCheckpoints(api.organisationId, forged, checkpoints, pem('public', KEYS));
    expect(proof.chain.ok).toBe(true); // the chain alone cannot tell
    expect(proof.ok).toBe(false);
    expect(proof.checkpoints[0]!.finding).toMatch(
      new RegExp(
        `^row ${checkpoints[0]!.seq} has hash [0-9a-f]{64}, not the signed [0-9a-f]{64}: the trail was rewritten$`,
      ),
    );
  });

  it('catches a trail cut before a checkpoint, and a checkpoint under another key', () => {
    const last = checkpoints.at(-1)!;
    const cut = rows.filter((row) => row.seq < last.seq);
    const proof = proveAgainstCheckpoints(api.organisationId, cut, checkpoints, pem('public', KEYS));
    expect(proof.ok).toBe(false);
    expect(proof.checkpoints.at(-1)!.finding).toBe(
      `the trail has no row ${last.seq}: it was cut after row ${last.seq - 1}`,
    );
    const other = proveAgainstCheckpoints(api.organisationId, rows, checkpoints, pem('public', OTHER_KEYS));
    expect(other.checkpoints.every((c) => !c.ok && c.finding.startsWith('not signed by this key'))).toBe(true);
  });

  it('runs from the command line: exit 0 when it holds, 4 when it does not', async () => {
    const args = (key: string, checkpointFile: string) => [
      '--export',
      join(folder, 'export.json'),
      '--public-key',
      join(folder, key),
      '--checkpoints',
      join(folder, checkpointFile),
    ];
    const good = await runVerify(args('public.pem', 'statement.json'));
    expect(good.code).toBe(0);
    expect(good.stdout).toMatch(/^chain: intact, \d+ rows/);
    expect(good.stdout).toContain('holds: rows 1 to');
    expect(good.stdout.trimEnd().endsWith('verified')).toBe(true);
    expect((await runVerify(args('public.pem', 'checkpoints.json'))).code).toBe(0);
    const bad = await runVerify(args('other.pem', 'checkpoints.json'));
    expect(bad.code).toBe(EXIT_VERIFY_FAILED);
    expect(bad.stdout.trimEnd().endsWith('NOT VERIFIED')).toBe(true);
    await expect(runVerify(['--export', join(folder, 'export.json')])).rejects.toThrow('--public-key FILE is required');
    await expect(runVerify(args('public.pem', 'public.pem'))).rejects.toThrow('is not JSON');
  });
});
