/**
 * The README's quick start, as a new user runs it: the demo seeds the
 * invented district through the API, and the printed URLs answer with the
 * printed keys.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runDemo, type DemoSeed } from '../../src/demo/main.js';
import type { RunningService } from '../../src/server.js';
import { forgetFrozenModels } from '../../src/services/frozen-models.js';

describe('npm run demo', () => {
  const folder = mkdtempSync(join(tmpdir(), 'mvledger-demo-'));
  let service: RunningService;
  let seed: DemoSeed;
  let base: string;
  let printed = '';

  beforeAll(async () => {
    ({ service, seed, base } = await runDemo({
      seedOnly: false,
      databaseFile: join(folder, 'demo.sqlite'),
      port: 0,
      print: (text) => (printed += text),
    }));
  }, 60_000);

  afterAll(async () => {
    await service.stop();
    rmSync(folder, { recursive: true, force: true });
  });

  const get = (path: string, token: string) =>
    fetch(`${base}${path}`, { headers: { authorization: `Bearer ${token}` } });

  it('prints the keys, the docs URL and a savings and a signature URL for every meter', () => {
    expect(printed).toContain(seed.adminKey);
    expect(printed).toContain(`${base}/docs`);
    expect(printed).toContain(`${base}/app/`);
    expect(printed).toContain(seed.engineerKey);
    const meters = seed.facilities.flatMap((f) => f.meters);
    expect(meters).toHaveLength(6); // three schools × electricity and gas (the scenario's own count)
    for (const meter of meters) {
      expect(printed).toContain(`/v1/meters/${meter.id}/savings`);
      expect(printed).toContain(`/v1/baselines/${meter.baselineId}/signature.svg`);
    }
    expect(printed).toContain('licensed professional');
  });

  it('answers the printed savings URL with the analyst key: every meter saved energy, distinguishably from zero', async () => {
    for (const meter of seed.facilities.flatMap((f) => f.meters)) {
      const response = await get(`/v1/meters/${meter.id}/savings?confidence=0.9`, seed.analystKey);
      expect(response.status).toBe(200);
      const body = (await response.json()) as {
        periods: unknown[];
        totals: { savings: number; fractionSaved: number; significant: boolean };
      };
      expect(body.periods).toHaveLength(12); // the reporting year's monthly bills (synthetic: the scenario sets them)
      // synthetic: the scenario saves 9–15% of use in 2025; the fitted models should see a saving of that order
      expect(body.totals.fractionSaved).toBeGreaterThan(0.05);
      expect(body.totals.fractionSaved).toBeLessThan(0.2);
      expect(body.totals.significant).toBe(true);
    }
  });

  it('prints the calendar case: weather alone books the longer break as savings, the calendar does not', () => {
    const { weatherOnly, withCalendar, trueSavings } = seed.calendarCase;
    expect(printed).toContain('Why a calendar matters');
    expect(printed).toContain(`/v1/meters/${seed.calendarCase.meterId}/savings`);
    // synthetic: the scenario sets the truth (an 8% saving; a 2025 summer break two weeks longer than the baseline's)
    expect(withCalendar.model).toContain('day type: break');
    expect(withCalendar.guideline14).toBe(true);
    expect(Math.abs(withCalendar.savings - trueSavings)).toBeLessThan(withCalendar.uncertainty);
    expect(weatherOnly.savings).toBeGreaterThan(1.5 * trueSavings);
  });

  it('serves a signature chart and a verifying audit chain', async () => {
    const meter = seed.facilities[0]!.meters[0]!;
    const chart = await get(`/v1/baselines/${meter.baselineId}/signature.svg`, seed.analystKey);
    expect(chart.status).toBe(200);
    expect(chart.headers.get('content-type')).toContain('image/svg+xml');
    expect(await chart.text()).toContain('<svg');
    const verify = (await (await get('/v1/audit/verify', seed.analystKey)).json()) as { ok: boolean; checked: number };
    expect(verify.ok).toBe(true);
    expect(verify.checked).toBeGreaterThan(20);
  });

  it('streams the same report from the stored compact models as from the baselines’ content', async () => {
    // The demo's baselines carry what the generated portfolio's do not: variables, a calendar, a superseded one.
    const report = async () => {
      const response = await get('/v1/reports/savings/stream?quarter=2025-Q3', seed.analystKey);
      expect(response.status).toBe(200);
      return response.text();
    };
    const db = service.store.db;
    forgetFrozenModels();
    const fromStored = await report();
    const stored = await db.selectFrom('frozen_models').selectAll().execute();
    expect(stored.length).toBeGreaterThanOrEqual(7); // synthetic: the scenario freezes a baseline for each of its seven meters
    await db.deleteFrom('frozen_models').execute();
    forgetFrozenModels();
    try {
      expect(await report()).toBe(fromStored);
    } finally {
      await db.insertInto('frozen_models').values(stored).execute();
      forgetFrozenModels();
    }
  });

  it('serves the OpenAPI document and the docs page', async () => {
    expect((await fetch(`${base}/openapi.json`)).status).toBe(200);
    expect((await fetch(`${base}/docs`, { redirect: 'follow' })).status).toBe(200);
  });
});
