/**
 * The workbench in headless Chromium against the demo service (test/support/
 * browser.ts says when this runs). The engineer signs in with the demo's
 * engineer key, uploads a CSV of bills with one bad row and sees the error
 * beside that row, uploads the corrected file, fits, excludes a bill with a
 * reason (when the API offers exclusions), picks a shape, freezes after the
 * confirmation and sees the savings; the analyst sees the bench without a
 * freeze button. Every screen passes axe-core with no serious or critical
 * violation, the page logs no console error (the strict content security
 * policy included), and screenshots go to test-artifacts/.
 *
 * Check values: synthetic (the test sets the bad row and its line), and the
 * service's own API answers (the page must show what the API says).
 */
import { mkdirSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { runDemo, type DemoSeed } from '../../src/demo/main.js';
import {
  BASELINE_END,
  BASELINE_START,
  DEMO_FACILITIES,
  demoBills,
  demoWeather,
  REPORTING_END,
} from '../../src/demo/scenario.js';
import type { RunningService } from '../../src/server.js';
import { browserAvailable, launchBrowser } from '../support/browser.js';
import { buildWorkbench, seriousViolations, signIn } from '../support/workbench.js';

const ARTIFACTS = fileURLToPath(new URL('../../test-artifacts/', import.meta.url));
const available = browserAvailable();

describe.skipIf(!available)('the workbench at /app', () => {
  let folder: string;
  let service: RunningService;
  let seed: DemoSeed;
  let base: string;
  let browser: Browser;
  let meterId: string;
  let goodCsv: string;
  let badCsv: string;
  /** The file line of the bad row: the header is line 1, so the fifth bill is line 6 (synthetic). */
  const BAD_LINE = 6;
  const problems: string[] = [];

  const api = async (method: string, path: string, token: string, body?: unknown) => {
    const response = await fetch(`${base}${path}`, {
      method,
      headers: {
        authorization: `Bearer ${token}`,
        ...(body === undefined ? {} : { 'content-type': 'application/json' }),
      },
      body: body === undefined ? undefined : JSON.stringify(body),
    });
    return { status: response.status, json: (await response.json()) as Record<string, unknown> };
  };

  async function newPage(): Promise<Page> {
    const page = await browser.newPage({ viewport: { width: 1280, height: 900 } });
    page.on('console', (message) => {
      if (message.type() !== 'error') return;
      // Chromium logs every refused request; an API refusal the page shows as a problem is the flow under test, not an error.
      const refusedApiCall =
        message.text().startsWith('Failed to load resource') &&
        new URL(message.location().url).pathname.startsWith('/v1/');
      if (!refusedApiCall) problems.push(`console: ${message.text()} at ${message.location().url}`);
    });
    page.on('pageerror', (error) => problems.push(`page: ${error.message}`));
    return page;
  }

  /** Whether the service's fit body (POST /v1/meters/{id}/baselines) has this field, per its own OpenAPI document. */
  async function fitBodyNames(field: string): Promise<boolean> {
    const document = (await (await fetch(`${base}/openapi.json`)).json()) as {
      paths: Record<string, { post?: { requestBody?: { content?: Record<string, { schema?: unknown }> } } }>;
      components?: { schemas?: Record<string, unknown> };
    };
    const body = document.paths['/v1/meters/{id}/baselines']?.post?.requestBody?.content?.['application/json']?.schema;
    const text = JSON.stringify(body ?? {});
    const ref = /"#\/components\/schemas\/([^"]+)"/.exec(text)?.[1];
    const schema = ref ? JSON.stringify(document.components?.schemas?.[ref] ?? {}) : text;
    return schema.includes(`"${field}"`);
  }

  async function checkScreen(page: Page, name: string): Promise<void> {
    mkdirSync(ARTIFACTS, { recursive: true });
    // The bench draws what lies below its first screenful a frame later: check the whole screen.
    await page.waitForFunction(() => {
      // A DOM global in the page; this file compiles against Node's types.
      const below = (
        globalThis as unknown as { document: { querySelector(s: string): { childElementCount: number } | null } }
      ).document.querySelector('.bench-below');
      return !below || below.childElementCount > 0;
    });
    await page.screenshot({ path: join(ARTIFACTS, `workbench-${name}.png`), fullPage: true });
    expect(await seriousViolations(page), `accessibility of ${name}`).toEqual([]);
  }

  beforeAll(async () => {
    buildWorkbench();
    folder = mkdtempSync(join(tmpdir(), 'mvledger-workbench-'));
    ({ service, seed, base } = await runDemo({
      seedOnly: false,
      databaseFile: join(folder, 'demo.sqlite'),
      port: 0,
      print: () => {},
    }));
    // A new meter at the demo's first school, on the demo's station, awaiting its bills (set-up through the API).
    const facility = seed.facilities[0]!;
    const meter = await api('POST', `/v1/facilities/${facility.id}/meters`, seed.engineerKey, {
      name: 'Kitchen sub-meter',
      fuel: 'electricity',
      unit: 'kWh',
      weatherStationId: seed.stationId,
    });
    expect(meter.status).toBe(201);
    meterId = String(meter.json.id);
    const weather = new Map(demoWeather().map((day) => [day.date, day.temp]));
    const plan = DEMO_FACILITIES[0]!.meters[0]!;
    const bills = [
      ...demoBills(plan, weather, BASELINE_START, BASELINE_END, 0, 901),
      ...demoBills(plan, weather, BASELINE_END, REPORTING_END, 0.1, 902),
    ];
    const lines = bills.map((b) => `${b.start},${b.end},${b.quantity}`);
    goodCsv = ['start,end,quantity', ...lines].join('\n') + '\n';
    const bad = [...lines];
    const [start, end] = bad[BAD_LINE - 2]!.split(',');
    bad[BAD_LINE - 2] = `${start},${end},-40`; // synthetic: a negative quantity
    badCsv = ['start,end,quantity', ...bad].join('\n') + '\n';
    browser = await launchBrowser();
  }, 180_000);

  afterAll(async () => {
    await browser?.close();
    await service?.stop();
    if (folder) rmSync(folder, { recursive: true, force: true });
  });

  it('serves /app under a strict content security policy', async () => {
    const response = await fetch(`${base}/app/`);
    expect(response.status).toBe(200);
    const policy = response.headers.get('content-security-policy')!;
    expect(policy).toContain("script-src 'self'");
    expect(policy).toContain("style-src 'self'");
    expect(policy).not.toContain('unsafe-inline');
    expect(policy).not.toMatch(/https?:/);
  });

  it('takes the engineer from a bad upload to frozen savings', async () => {
    const page = await newPage();
    await page.goto(`${base}/app/`);
    await page.getByLabel('API key').waitFor();
    await checkScreen(page, 'sign-in');
    await signIn(page, base, seed.engineerKey);
    await page.locator('section.facility').first().waitFor();
    expect(await page.locator('header.masthead').textContent()).toContain('(engineer)');
    await checkScreen(page, 'facilities');

    // Data: a file with one bad row is refused and the error sits beside that row.
    await page.goto(`${base}/app/#/meter/${meterId}/data`);
    await page.getByRole('heading', { name: 'Upload a CSV file' }).waitFor();
    await page
      .getByLabel('CSV file', { exact: true })
      .setInputFiles({ name: 'bills.csv', mimeType: 'text/csv', buffer: Buffer.from(badCsv) });
    await page.getByRole('button', { name: 'Upload' }).click();
    const badRow = page.locator(`tr[data-line="${BAD_LINE}"]`);
    await badRow.waitFor();
    expect(await badRow.getAttribute('class')).toContain('row-error');
    expect(await badRow.locator('.row-problem').textContent()).toContain(`row ${BAD_LINE}, field quantity`);
    expect(await page.locator('tr.row-error').count()).toBe(1);
    await checkScreen(page, 'data-refused-upload');

    // The corrected file is stored.
    await page
      .getByLabel('CSV file', { exact: true })
      .setInputFiles({ name: 'bills.csv', mimeType: 'text/csv', buffer: Buffer.from(goodCsv) });
    await page.getByRole('button', { name: 'Upload' }).click();
    await page.locator('.notice-success').waitFor();
    expect(await page.locator('.notice-success').textContent()).toContain('created 36');
    await page.locator('table.data caption', { hasText: 'Readings of Kitchen sub-meter' }).waitFor();

    // Bench: fit the two baseline years.
    await page.goto(`${base}/app/#/meter/${meterId}/bench`);
    await page.getByRole('heading', { name: 'Fit a baseline' }).waitFor();
    await page.getByLabel('First day of the baseline').fill(BASELINE_START);
    await page.getByLabel('Day after the baseline (end exclusive)').fill(BASELINE_END);
    await page.getByRole('button', { name: 'Fit', exact: true }).click();
    await page.locator('figure[data-chart="candidates"] svg').waitFor();
    expect(await page.locator('.status-line').textContent()).toContain('Draft (v1)');
    expect(await page.locator('svg polyline[data-model]').count()).toBeGreaterThanOrEqual(4);
    await checkScreen(page, 'bench-draft');

    // Exclude a bill with a reason. Where this build's API takes exclusions with a fit (the OpenAPI document says), the
    // refit is draft v2 with the reason shown; where it does not yet, the page shows the API's refusal naming the field.
    const offersExclusions = await fitBodyNames('exclusions');
    await page
      .getByRole('button', { name: /^Exclude the bill/ })
      .nth(2)
      .click();
    await page.getByLabel(/^Why leave out/).fill('Meter fault reported by the site (invented)');
    await page.getByRole('button', { name: 'Add' }).click();
    await page.getByText('Meter fault reported by the site (invented)').first().waitFor();
    await page.getByRole('button', { name: 'Fit with these exclusions' }).click();
    if (offersExclusions) {
      await page.locator('.status-line', { hasText: 'Draft (v2)' }).waitFor();
      expect(await page.textContent('main')).toContain('Meter fault reported by the site (invented)');
    } else {
      console.warn(
        'workbench test: this build of the API takes no exclusions with a fit: the page must show its refusal',
      );
      const refusal = page.locator('form.fit .notice-error');
      await refusal.waitFor();
      expect(await refusal.textContent()).toContain('exclusions');
      await checkScreen(page, 'bench-exclusion-refused');
      await page.getByRole('button', { name: 'Fit without exclusions' }).click();
      await page.getByRole('button', { name: 'Fit', exact: true }).waitFor();
    }

    // Pick a shape other than the current one.
    const current = (await page.locator('input[name="shape"]:checked').getAttribute('value'))!;
    const other = (
      await page
        .locator('input[name="shape"]')
        .evaluateAll((inputs) => inputs.map((i) => (i as unknown as { value: string }).value))
    ).find((m) => m !== current)!;
    await page.locator(`input[name="shape"][value="${other}"]`).check();
    await page.getByLabel(/^Why this shape/).fill('The simpler shape is easier to defend (invented)');
    await page.getByRole('button', { name: 'Use this shape' }).click();
    await page.locator('.status-line', { hasText: `chosen ${other}` }).waitFor();

    // Freeze, through the confirmation that says what freezing means.
    await page.getByRole('button', { name: 'Freeze…' }).click();
    const dialog = page.getByRole('dialog');
    await dialog.waitFor();
    expect(await dialog.textContent()).toContain('content hash');
    await checkScreen(page, 'bench-freeze-confirmation');
    await dialog.getByLabel(/^What the freeze rests on/).fill('Clause 4.2 of the M&V plan (invented)');
    await dialog.getByRole('button', { name: /^Freeze version/ }).click();
    await page.locator('.status-line', { hasText: 'Frozen' }).waitFor();
    expect(await page.locator('.status-line').textContent()).toMatch(/Content hash [0-9a-f]{64}/);
    expect(await page.getByRole('button', { name: 'Freeze…' }).count()).toBe(0);
    await checkScreen(page, 'bench-frozen');

    // Savings against the frozen baseline.
    await page.goto(`${base}/app/#/meter/${meterId}/savings`);
    await page.locator('dl.totals').waitFor();
    const shown = Number(await page.locator('[data-total="savings"]').getAttribute('data-value'));
    const savings = await api('GET', `/v1/meters/${meterId}/savings`, seed.engineerKey);
    expect(shown).toBe((savings.json.totals as { savings: number }).savings);
    expect(await page.locator('svg[data-chart="period-comparison"]').count()).toBe(1);
    await checkScreen(page, 'savings');

    await page.goto(`${base}/app/#/reports`);
    await page.getByRole('heading', { name: 'Savings report', exact: true }).waitFor();
    await page.getByRole('heading', { name: 'Statements', exact: true }).waitFor();
    await checkScreen(page, 'reports');
    await page.close();
  });

  it('shows the analyst the bench without fit, choice or freeze', async () => {
    const page = await newPage();
    await signIn(page, base, seed.analystKey);
    const meter = seed.facilities[0]!.meters[1]!;
    await page.goto(`${base}/app/#/meter/${meter.id}/bench`);
    await page.locator('figure[data-chart="candidates"] svg').waitFor();
    expect(await page.getByRole('button', { name: /Freeze/ }).count()).toBe(0);
    expect(await page.getByRole('button', { name: 'Use this shape' }).count()).toBe(0);
    expect(await page.locator('form.fit').count()).toBe(0);
    expect(await page.textContent('main')).toContain('need the ledger permission');
    await checkScreen(page, 'bench-analyst');
    // On a tablet (768 px wide, portrait) the same bench reflows; still no serious violation.
    await page.setViewportSize({ width: 768, height: 1024 });
    await page.locator('figure[data-chart="candidates"] svg').waitFor();
    await checkScreen(page, 'bench-analyst-tablet');
    // And the API agrees: the analyst's freeze is refused.
    const refused = await api('POST', `/v1/baselines/${meter.baselineId}/freeze`, seed.analystKey, {
      note: 'not allowed',
    });
    expect(refused.status).toBe(403);
    await page.close();
  });

  it('logged no console error on any page', () => {
    expect(problems).toEqual([]);
  });
});
