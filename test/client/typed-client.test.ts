/**
 * An integrating system's view: a typed client generated from the committed
 * OpenAPI document (openapi-typescript → openapi/client/mvledger-api.d.ts,
 * `npm run client`) drives the running demo through openapi-fetch, with the
 * demo's integration key: list meters, post a bill, read it back, read
 * savings and the quarterly report. A path or field the document does not
 * declare fails the type-check. Check values: the demo scenario's own
 * counts and the bill the test posts (synthetic).
 */
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import createClient from 'openapi-fetch';
import openapiTS, { astToString } from 'openapi-typescript';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runDemo, type DemoSeed } from '../../src/demo/main.js';
import { OPENAPI_FILE } from '../../src/http/openapi/document.js';
import type { RunningService } from '../../src/server.js';
import type { paths } from '../../openapi/client/mvledger-api.js';

const CLIENT_FILE = new URL('../../openapi/client/mvledger-api.d.ts', import.meta.url);

describe('a typed client generated from the OpenAPI document drives the demo', () => {
  const folder = mkdtempSync(join(tmpdir(), 'mvledger-client-'));
  let service: RunningService;
  let seed: DemoSeed;
  let base: string;

  beforeAll(async () => {
    ({ service, seed, base } = await runDemo({
      seedOnly: false,
      databaseFile: join(folder, 'demo.sqlite'),
      port: 0,
      print: () => {},
    }));
  }, 90_000);

  afterAll(async () => {
    await service?.stop();
    rmSync(folder, { recursive: true, force: true });
  });

  it('is the generator’s output for the committed document (regenerate with npm run client)', async () => {
    const generated = astToString(await openapiTS(new URL(`file://${OPENAPI_FILE}`)));
    const committed = readFileSync(CLIENT_FILE, 'utf8');
    // The CLI adds a banner comment; the types themselves must match.
    expect(committed.endsWith(generated)).toBe(true);
  }, 30_000);

  it('lists meters, posts a bill, reads it back and reads savings and the report as the billing system', async () => {
    const api = createClient<paths>({ baseUrl: base, headers: { authorization: `Bearer ${seed.integrationKey}` } });

    const listed = await api.GET('/v1/meters');
    expect(listed.response.status).toBe(200);
    const meters = listed.data!.meters;
    expect(meters).toHaveLength(seed.facilities.flatMap((f) => f.meters).length + 1); // the scenario's six school meters and the early-years centre's
    const meter = meters[0]!;

    const bill = { start: '2026-01-01', end: '2026-02-01', quantity: 1234.5, cost: 180.25 };
    const posted = await api.POST('/v1/meters/{id}/readings', {
      params: { path: { id: meter.id } },
      body: { readings: [bill] },
    });
    expect(posted.response.status).toBe(201);
    expect(posted.data).toMatchObject({ meterId: meter.id, created: 1 }); // synthetic: one new bill

    const readBack = await api.GET('/v1/meters/{id}/readings', {
      params: { path: { id: meter.id }, query: { from: '2026-01-01' } },
    });
    expect(readBack.data!.readings).toEqual([
      { ...bill, id: `${bill.start}..${bill.end}`, days: 31, estimated: false },
    ]); // synthetic: what was posted (a reading's id is its period)

    const savings = await api.GET('/v1/meters/{id}/savings', {
      params: { path: { id: meter.id }, query: { from: '2025-01-01', to: '2026-01-01', confidence: 0.9 } },
    });
    expect(savings.response.status).toBe(200);
    expect(savings.data!.meterId).toBe(meter.id);

    const report = await api.GET('/v1/reports/savings', { params: { query: { quarter: '2025-Q4' } } });
    expect(report.response.status).toBe(200);

    // Nothing more: the integration key cannot create a facility.
    const refused = await api.POST('/v1/facilities', { body: { name: 'Not allowed (invented)' } });
    expect(refused.response.status).toBe(403);
    expect(refused.error).toMatchObject({ status: 403 });
  }, 60_000);
});
