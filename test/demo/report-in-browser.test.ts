/**
 * The finish line, end to end: `npm run demo` seeds the invented
 * district and saves its quarterly report from the API; that file opens in
 * headless Chromium (test/support/browser.ts says when this runs), renders
 * without errors, shows every facility with its charts, and the totals on
 * the page equal the JSON report and the CSV of the same request. A
 * full-page screenshot is kept in test-artifacts/. Check values: the
 * service's own JSON report (the HTML and CSV must agree with it).
 */
import { mkdirSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { runDemo, type DemoSeed } from '../../src/demo/main.js';
import { DEMO_QUARTER } from '../../src/demo/scenario.js';
import type { RunningService } from '../../src/server.js';
import type { SavingsReport } from '../../src/reports/savings-report.js';
import { browserAvailable, launchBrowser } from '../support/browser.js';

const ARTIFACTS = fileURLToPath(new URL('../../test-artifacts/', import.meta.url));
const available = browserAvailable();

describe.skipIf(!available)('the demo’s quarterly report in a browser', () => {
  let folder: string;
  let service: RunningService;
  let seed: DemoSeed;
  let base: string;
  let browser: Browser;
  let page: Page;
  let report: SavingsReport;
  let csv: string;
  const problems: string[] = [];

  const get = async (query: string) => {
    const response = await fetch(`${base}/v1/reports/savings?${query}`, {
      headers: { authorization: `Bearer ${seed.analystKey}` },
    });
    expect(response.status).toBe(200);
    return response.text();
  };

  beforeAll(async () => {
    folder = mkdtempSync(join(tmpdir(), 'mvledger-demo-report-'));
    ({ service, seed, base } = await runDemo({
      seedOnly: false,
      databaseFile: join(folder, 'demo.sqlite'),
      port: 0,
      print: () => {},
    }));
    report = JSON.parse(await get(`quarter=${DEMO_QUARTER}`)) as SavingsReport;
    csv = await get(`quarter=${DEMO_QUARTER}&format=csv`);
    browser = await launchBrowser();
    page = await browser.newPage({ viewport: { width: 1100, height: 900 } });
    page.on('console', (message) => message.type() === 'error' && problems.push(message.text()));
    page.on('pageerror', (error) => problems.push(error.message));
    await page.goto(pathToFileURL(seed.reports.quarter).href, { waitUntil: 'load' });
  }, 120_000);

  afterAll(async () => {
    await browser?.close();
    await service?.stop();
    if (folder) rmSync(folder, { recursive: true, force: true });
  });

  it('opens the saved report file without errors, for the quarter the demo prints', async () => {
    expect(problems).toEqual([]);
    expect(await page.title()).toContain(DEMO_QUARTER);
    expect(await page.locator('section.facility').count()).toBe(4); // three schools and the early-years centre (the scenario's count)
    expect(await page.textContent('body')).toContain(report.contentHash);
    expect(await page.textContent('body')).toContain('licensed professional');
  });

  it('draws the charts: per meter, actual against adjusted baseline and the energy signature; per facility, savings against the guarantee', async () => {
    const boxes = await page
      .locator('figure svg')
      .evaluateAll((svgs) => svgs.map((svg) => svg.getBoundingClientRect()).map((r) => r.width * r.height));
    const meters = report.facilities.flatMap((f) => f.meters).length;
    expect(boxes.length).toBeGreaterThanOrEqual(2 * meters + report.facilities.length);
    expect(boxes.every((area) => area > 10_000)).toBe(true);
    expect(await page.locator('svg[data-chart="period-comparison"]').count()).toBe(meters);
    expect(await page.locator('svg[data-chart="cumulative-savings"]').count()).toBeGreaterThanOrEqual(
      report.facilities.length,
    );
  });

  it('states the same totals as the JSON report, and the CSV agrees', async () => {
    const value = async (key: string) =>
      Number(await page.locator(`[data-total="${key}"]`).first().getAttribute('data-value'));
    expect(await value('portfolio-savings-MMBtu')).toBe(report.portfolio.totals.MMBtu.savings);
    expect(await value('portfolio-savings-GJ')).toBe(report.portfolio.totals.GJ.savings);
    expect(await value('portfolio-uncertainty-MMBtu')).toBe(report.portfolio.totals.MMBtu.uncertainty);
    expect(await value('portfolio-cost-USD')).toBe(report.portfolio.cost[0]!.avoided);
    for (const facility of report.facilities) {
      expect(await value(`facility-${facility.id}-savings-MMBtu`)).toBe(facility.totals.MMBtu.savings);
      for (const meter of facility.meters) {
        expect(await value(`meter-${meter.id}-savings`)).toBe(meter.energy!.savings);
        expect(await value(`meter-${meter.id}-cost`)).toBe(meter.cost!.avoided);
      }
    }
    // The CSV's meter rows hold the same savings, to its six decimals.
    const lines = csv.trimEnd().split('\r\n');
    const header = lines[0]!.split(',');
    const column = (name: string) => header.indexOf(name);
    for (const meter of report.facilities.flatMap((f) => f.meters)) {
      const row = lines
        .find((line) => line.startsWith(`meter,`) && line.split(',')[column('meter_id')] === meter.id)!
        .split(',');
      expect(Number(row[column('savings')])).toBeCloseTo(meter.energy!.savings, 5);
    }
    // The visible text shows the rounded figure too.
    const shown = await page.locator('[data-total="portfolio-savings-MMBtu"]').first().textContent();
    expect(shown!.replace(/[,\s]/g, '')).toBe(report.portfolio.totals.MMBtu.savings.toFixed(1));
  });

  it('lists the non-routine adjustment with its reason, and keeps a screenshot', async () => {
    const adjustment = report.facilities.flatMap((f) => f.meters).flatMap((m) => m.adjustments)[0]!;
    expect(await page.textContent('body')).toContain(adjustment.reason);
    mkdirSync(ARTIFACTS, { recursive: true });
    await page.screenshot({ path: join(ARTIFACTS, `demo-report-${DEMO_QUARTER}.png`), fullPage: true });
  });
});
