/**
 * Issued savings statements over HTTP: issue, stored bytes, the approval
 * workflow, compare, and the refusals. Check values: SHA-256 of the bytes
 * served (node:crypto), the report the same request gives (the stored copy
 * must carry it unchanged), and synthetic data whose truth the test sets.
 * The print check drives Debian's chromium (test/support/browser.ts) and
 * reads the printed PDF's text with pdfjs-dist.
 */
import { createHash } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApi, type TestApi } from '../support/api.js';
import { databaseDigest } from '../support/db-digest.js';
import { browserAvailable, launchBrowser } from '../support/browser.js';
import { CLIMATES, SAMPLE_BUILDING, dailyWeather, monthlyReadings, seededRandom } from '../support/synthetic.js';
import { verifyAuditChain } from '../../src/store/audit.js';

// synthetic: the test sets the truth. 24 baseline bills, then 12 reporting bills after measures.
const random = seededRandom(73);
const WEATHER = dailyWeather(CLIMATES.temperate, '2023-01-01', 1130, random);
const BASELINE = monthlyReadings(SAMPLE_BUILDING, WEATHER, '2023-01-01', 24, random);
const REPORTING = monthlyReadings(
  { ...SAMPLE_BUILDING, base: 255, heatingRate: 6.5 },
  WEATHER,
  '2025-01-01',
  12,
  random,
);
// The first reporting quarter's bills, and one bill of the second quarter held back to post after issue.
const FIRST_QUARTER = REPORTING.filter((r) => r.start < '2025-03-25');
const LATER = REPORTING.filter((r) => r.start >= '2025-03-25');

let api: TestApi;
let facilityId: string;
let meterId: string;

const sha256 = (text: string) => createHash('sha256').update(text).digest('hex');

async function ok(
  method: 'POST' | 'PUT',
  url: string,
  body: unknown,
  as: 'engineer' | 'analyst' | 'admin' = 'engineer',
  status?: number,
): Promise<any> {
  const reply = await api.call(method, url, { as, body });
  expect(reply.status, `${method} ${url}: ${reply.text}`).toBe(status ?? (method === 'POST' ? 201 : 200));
  return reply.json;
}

const issue = (body: unknown, as: 'engineer' | 'admin' = 'engineer') =>
  api.call('POST', '/v1/statements', { as, body });

/** A bad request is refused as problem+json naming what is wrong, and stores nothing. */
async function refusedWithNothingStored(
  send: () => Promise<{ status: number; headers: Record<string, unknown>; json: any }>,
  status: number,
  says: RegExp,
) {
  const before = await databaseDigest(api.store.db);
  const reply = await send();
  expect(reply.status, JSON.stringify(reply.json)).toBe(status);
  expect(String(reply.headers['content-type'])).toMatch(/^application\/problem\+json/);
  expect(reply.json.detail).toMatch(says);
  expect(await databaseDigest(api.store.db)).toBe(before);
}

beforeAll(async () => {
  api = await makeTestApi();
  const stationId = (await ok('POST', '/v1/weather-stations', { name: 'Invented ridge station', temperatureUnit: 'F' }))
    .id;
  await ok('PUT', `/v1/weather-stations/${stationId}/observations`, { observations: WEATHER }, 'engineer', 200);
  facilityId = (await ok('POST', '/v1/facilities', { name: 'Invented library' })).id;
  meterId = (
    await ok('POST', `/v1/facilities/${facilityId}/meters`, {
      name: 'Library electric',
      fuel: 'electricity',
      unit: 'kWh',
      weatherStationId: stationId,
    })
  ).id;
  await ok('POST', `/v1/meters/${meterId}/readings`, {
    readings: [...BASELINE, ...FIRST_QUARTER].map((r) => ({ start: r.start, end: r.end, quantity: r.quantity })),
  });
  const draft = await ok('POST', `/v1/meters/${meterId}/baselines`, { start: '2023-01-01', end: '2025-01-01' });
  await ok('POST', `/v1/baselines/${draft.id}/freeze`, { note: 'Agreed (test)' }, 'engineer', 200);
  await ok(
    'PUT',
    `/v1/meters/${meterId}/rates`,
    { currency: 'USD', rates: [{ from: '2025-01-01', price: 0.1 }] },
    'engineer',
    200,
  );
  await ok(
    'PUT',
    `/v1/facilities/${facilityId}/contract`,
    {
      start: '2025-01-01',
      years: 5,
      currency: 'USD',
      energyUnit: 'MMBtu',
      guarantees: [{ year: 1, energy: 100 }],
      reference: 'EPC-INV-0042 (invented)',
      parties: [
        { role: 'customer', name: 'Invented County Libraries' },
        { role: 'energy service company', name: 'Invented Retrofit Partners' },
      ],
      mvPlanReference: 'M&V plan rev. 3 (invented)',
      mvOption: 'C',
      confidence: 0.95,
    },
    'engineer',
    200,
  );
});
afterAll(async () => {
  await api?.close();
});

describe('POST /v1/statements and the stored bytes', () => {
  let statement: any;
  const stored: Record<'json' | 'csv' | 'html', string> = { json: '', csv: '', html: '' };

  it('issues a prepared statement at the contract’s confidence, with its hashes, audit head and data-through date', async () => {
    const reply = await issue({ window: { quarter: '2025-Q1' }, facilityId, note: 'First quarter (test)' });
    expect(reply.status, reply.text).toBe(201);
    statement = reply.json;
    expect(statement.status).toBe('prepared');
    expect(statement.window).toMatchObject({
      quarter: '2025-Q1',
      from: '2025-01-01',
      to: '2025-04-01',
      kind: 'quarter',
    });
    expect(statement.confidence).toBe(0.95); // the contract names 95%; the request names none
    expect(statement.preparedBy).toBeTruthy();
    expect(statement.approvedBy).toBeNull();
    expect(statement.copies).toHaveLength(1);
    // hand-worked: the last reporting bill whose midpoint lies in the quarter ends (exclusive) on its read date
    const counted = FIRST_QUARTER.filter((r) => r.end <= '2025-04-10');
    const lastEnd = counted[counted.length - 1]!.end;
    const dayBefore = new Date(Date.parse(`${lastEnd}T00:00:00Z`) - 86_400_000).toISOString().slice(0, 10);
    expect(statement.dataThrough).toBe(dayBefore);
    const audit = await api.call('GET', `/v1/audit?entity=statement&entityId=${statement.id}`, { as: 'analyst' });
    expect(audit.json.entries.map((e: any) => e.action)).toEqual(['issue-statement']);
    expect(audit.json.entries[0].after.contentHashes).toEqual(statement.contentHashes);
  });

  it('serves the stored bytes in every format, each matching its content hash', async () => {
    for (const format of ['json', 'csv', 'html'] as const) {
      const reply = await api.call('GET', `/v1/statements/${statement.id}/document?format=${format}`, {
        as: 'analyst',
      });
      expect(reply.status).toBe(200);
      expect(reply.headers['x-content-hash']).toBe(sha256(reply.text));
      expect(reply.headers['x-content-hash']).toBe(statement.contentHashes[format]);
      stored[format] = reply.text;
    }
    const document = JSON.parse(stored.json);
    expect(document.statement.steps.map((s: any) => s.step)).toEqual(['prepared']);
    expect(document.statement.steps[0].by).toEqual({
      keyId: statement.preparedBy,
      name: 'engineer key',
      role: 'engineer',
    });
    expect(document.report.confidence).toBe(0.95);
    expect(document.report.contentHash).toBe(statement.reportHash);
    const meter = document.report.facilities[0].meters[0];
    expect(meter.weatherStationName).toBe('Invented ridge station');
    expect(meter.baseline.modelName).toMatch(/\((1P|2P|3PC|3PH|4P|5P)\)$/);
    expect(meter.baseline.coefficients.length).toBeGreaterThan(0);
    expect(typeof meter.baseline.nmbe).toBe('number');
    expect(stored.csv.split('\r\n')[1]).toMatch(new RegExp(`^statement,.*${statement.id}`));
    expect(stored.html).toContain('awaiting approval');
    expect(stored.html).toContain('EPC-INV-0042 (invented)');
    expect(stored.html).toContain('IPMVP option C');
    expect(stored.html).toContain('Invented County Libraries');
  });

  it('gives the same bytes back after more data is posted, and compare lists the change', async () => {
    // A bill of the quarter corrected and a later bill posted: today's report differs, the stored one does not.
    const corrected = { ...FIRST_QUARTER[1]!, quantity: FIRST_QUARTER[1]!.quantity + 500 };
    await ok('POST', `/v1/meters/${meterId}/readings`, {
      readings: [{ start: corrected.start, end: corrected.end, quantity: corrected.quantity }],
      correctionReason: 'Meter re-read (test)',
    });
    await ok('POST', `/v1/meters/${meterId}/readings`, {
      readings: LATER.map((r) => ({ start: r.start, end: r.end, quantity: r.quantity })),
    });
    for (const format of ['json', 'csv', 'html'] as const) {
      const reply = await api.call('GET', `/v1/statements/${statement.id}/document?format=${format}`, {
        as: 'analyst',
      });
      expect(reply.text).toBe(stored[format]);
    }
    const compare = await api.call('GET', `/v1/statements/${statement.id}/compare`, { as: 'analyst' });
    expect(compare.status, compare.text).toBe(200);
    expect(compare.json.unchanged).toBe(false);
    const kinds = compare.json.changes.map((c: any) => c.kind);
    expect(kinds).toContain('reading-corrected');
    const change = compare.json.changes.find((c: any) => c.kind === 'reading-corrected');
    expect(change).toMatchObject({ meterId, before: FIRST_QUARTER[1]!.quantity, after: corrected.quantity });
    expect(kinds).toContain('savings-changed');
    expect(compare.json.auditSince.map((e: any) => e.action)).toContain('post-readings');
  });

  it('approves by an analyst: a new stored copy names both people; the issued copy is unchanged', async () => {
    const reply = await api.call('POST', `/v1/statements/${statement.id}/approve`, { as: 'analyst', body: {} });
    expect(reply.status, reply.text).toBe(200);
    expect(reply.json.status).toBe('approved');
    expect(reply.json.copies.map((c: any) => c.kind)).toEqual(['issued', 'approved']);
    const html = await api.call('GET', `/v1/statements/${statement.id}/document?format=html`, { as: 'analyst' });
    expect(html.headers['x-statement-copy']).toBe('2');
    expect(html.text).toContain('data-step="approved"');
    expect(html.text).toMatch(/analyst key<\/td><td>analyst<\/td>/);
    expect(html.text).toContain(statement.contentHashes.html); // the approved copy names the issued copy's hash
    const first = await api.call('GET', `/v1/statements/${statement.id}/document?format=html&copy=1`, {
      as: 'analyst',
    });
    expect(first.text).toBe(stored.html);
    const json = JSON.parse((await api.call('GET', `/v1/statements/${statement.id}/document`, { as: 'analyst' })).text);
    expect(json.report).toEqual(JSON.parse(stored.json).report);
    expect(await verifyAuditChain(api.store.db, api.organisationId)).toMatchObject({ ok: true });
  });

  it('refuses approving a voided statement and one’s own statement, and an empty window: problem+json, nothing stored', async () => {
    const own = (await issue({ window: { quarter: '2025-Q1' }, facilityId }, 'admin')).json;
    await refusedWithNothingStored(
      () => api.call('POST', `/v1/statements/${own.id}/approve`, { as: 'admin', body: {} }),
      403,
      /its preparer may not approve it/,
    );
    await ok(
      'POST',
      `/v1/statements/${own.id}/void`,
      { reason: 'Issued twice (test)', replacedBy: statement.id },
      'analyst',
      200,
    );
    await refusedWithNothingStored(
      () => api.call('POST', `/v1/statements/${own.id}/approve`, { as: 'analyst', body: {} }),
      409,
      /is voided/,
    );
    await refusedWithNothingStored(
      () => issue({ window: { quarter: '2031-Q1' }, facilityId }),
      422,
      /no meter .* has reporting data in 2031-Q1/,
    );
    await refusedWithNothingStored(
      () => issue({ window: { quarter: '2025-Q1', contractYear: 1 } }),
      400,
      /exactly one of/,
    );
    await refusedWithNothingStored(
      () => api.call('POST', `/v1/statements/${statement.id}/approve`, { as: 'engineer', body: {} }),
      403,
      /approve/,
    );
    await refusedWithNothingStored(
      () => api.call('POST', `/v1/statements/${statement.id}/approve`, { as: 'other', body: {} }),
      404,
      /not found/,
    );
  });

  it('rejects with a reason, lists newest first, and voids with a replacement', async () => {
    const second = (await issue({ window: { contractYear: 1 }, facilityId, confidence: 0.9 })).json;
    expect(second.confidence).toBe(0.9);
    const rejected = await ok(
      'POST',
      `/v1/statements/${second.id}/reject`,
      { reason: 'Wrong window (test)' },
      'analyst',
      200,
    );
    expect(rejected).toMatchObject({ status: 'rejected', rejectionReason: 'Wrong window (test)' });
    const list = await api.call('GET', '/v1/statements', { as: 'analyst' });
    expect(list.json.statements[0].id).toBe(second.id);
    const html = (await api.call('GET', `/v1/statements/${second.id}/document?format=html`, { as: 'analyst' })).text;
    expect(html).toContain('Wrong window (test)');
    expect(html).toContain('REJECTED');
  });
});

describe('one confidence level per statement', () => {
  it('takes the contract’s level for every ± unless the request names another; the Guideline 14 verdict stays at 68%', async () => {
    const byContract = await api.call('GET', `/v1/reports/savings?quarter=2025-Q1&facilityId=${facilityId}`, {
      as: 'analyst',
    });
    const named = await api.call(
      'GET',
      `/v1/reports/savings?quarter=2025-Q1&facilityId=${facilityId}&confidence=0.68`,
      { as: 'analyst' },
    );
    expect(byContract.json).toMatchObject({ confidence: 0.95, confidenceSource: 'contract' });
    expect(named.json).toMatchObject({ confidence: 0.68, confidenceSource: 'request' });
    const a = byContract.json.facilities[0].meters[0];
    const b = named.json.facilities[0].meters[0];
    expect(a.energy.uncertainty).toBeGreaterThan(b.energy.uncertainty); // a wider band at 95% than at 68%
    expect(a.significant).toBe(b.significant); // judged at 68% whatever the report's level
    const html = (
      await api.call('GET', `/v1/reports/savings?quarter=2025-Q1&facilityId=${facilityId}&format=html`, {
        as: 'analyst',
      })
    ).text;
    expect(html).toContain(
      '95% two-sided (the level the contract names); the ASHRAE Guideline 14 significance verdict is always judged at 68%',
    );
  });

  it('asks for a level when the report’s facilities name different ones, and takes 90% where no contract names one', async () => {
    const other = (await ok('POST', '/v1/facilities', { name: 'Invented depot (no meters)' })).id;
    await ok(
      'PUT',
      `/v1/facilities/${other}/contract`,
      { start: '2025-01-01', years: 1, energyUnit: 'MMBtu', guarantees: [] },
      'engineer',
      200,
    );
    const mixed = await api.call('GET', '/v1/reports/savings?quarter=2025-Q1', { as: 'analyst' });
    expect(mixed.status).toBe(422);
    expect(mixed.json.detail).toMatch(
      /^confidence: the facilities' contracts name different confidence levels \(0\.9, 0\.95\)/,
    );
    expect((await api.call('GET', `/v1/facilities/${other}/contract`, { as: 'analyst' })).json.confidence).toBe(0.9);
  });
});

describe.skipIf(!browserAvailable())('an issued statement in print (chromium)', () => {
  it('prints with a running header, "Page N of M" on every page and the approval block', async () => {
    const list = (await api.call('GET', '/v1/statements', { as: 'analyst' })).json.statements;
    const approved = list.find((s: any) => s.status === 'approved');
    const html = (await api.call('GET', `/v1/statements/${approved.id}/document?format=html`, { as: 'analyst' })).text;
    const browser = await launchBrowser();
    let pdf: Buffer;
    try {
      const page = await browser.newPage();
      await page.setContent(html, { waitUntil: 'load' });
      await page.emulateMedia({ media: 'print' });
      pdf = await page.pdf({ preferCSSPageSize: true, printBackground: true });
    } finally {
      await browser.close();
    }
    const { getDocument } = await import('pdfjs-dist/legacy/build/pdf.mjs');
    const document = await getDocument({ data: new Uint8Array(pdf), useSystemFonts: false, isEvalSupported: false })
      .promise;
    const pages: string[] = [];
    for (let n = 1; n <= document.numPages; n++) {
      const content = await (await document.getPage(n)).getTextContent();
      pages.push(
        content.items
          .map((item: any) => ('str' in item ? item.str : ''))
          .join(' ')
          .replace(/\s+/g, ' '),
      );
    }
    expect(pages.length).toBeGreaterThan(1);
    pages.forEach((text, i) => {
      expect(text, `page ${i + 1}`).toContain(`Page ${i + 1} of ${pages.length}`);
      // The PDF's text layer splits ligatures (an id's "ff" can come back as "f f"): compare without spaces.
      expect(text.replace(/\s+/g, ''), `page ${i + 1}`).toContain(`Savingsstatement${approved.id}`);
      expect(text, `page ${i + 1}`).toContain('APPROVED');
    });
    expect(pages[0]).toContain('Approval');
    expect(pages[0]).toMatch(/Approved analyst key analyst/);
    expect(pages[0]).toMatch(/Prepared engineer key engineer/);
  }, 60_000);
});
