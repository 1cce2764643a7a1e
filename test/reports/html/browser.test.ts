/**
 * The printable report in headless Chromium (test/support/browser.ts says
 * when this runs): it renders without errors, every facility section and
 * chart has a real box, the totals read back from the DOM equal the report
 * object, print styles apply, and a PDF comes out. It leaves a full-page
 * screenshot and the PDF in test-artifacts/ for a person to look at.
 * Synthetic: the fixture report sets every number.
 */
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { renderReportHtml } from '../../../src/reports/html/render-report.js';
import { SAMPLE_REPORT } from '../fixtures/sample-report.js';
import { expectedTotals } from '../fixtures/expected-totals.js';
import { browserAvailable, launchBrowser } from '../../support/browser.js';

const ARTIFACTS = fileURLToPath(new URL('../../../test-artifacts/', import.meta.url));
/** A4 (210 mm) less the 12 mm side margins of the print style, at 96 px per inch: 186 / 25.4 × 96 ≈ 703 px (hand-worked). */
const A4_CONTENT_WIDTH_PX = 703;

const available = browserAvailable();

describe.skipIf(!available)('the HTML report in headless Chromium', () => {
  let browser: Browser;
  let page: Page;
  const problems: string[] = [];
  const requests: string[] = [];

  beforeAll(async () => {
    browser = await launchBrowser();
    page = await browser.newPage({ viewport: { width: 1100, height: 900 } });
    page.on('console', (message) => {
      if (message.type() === 'error' || message.type() === 'warning')
        problems.push(`${message.type()}: ${message.text()}`);
    });
    page.on('pageerror', (error) => problems.push(`page error: ${error.message}`));
    page.on('request', (request) => requests.push(request.url()));
    await page.setContent(renderReportHtml(SAMPLE_REPORT), { waitUntil: 'load' });
  });

  afterAll(async () => {
    await browser?.close();
  });

  it('renders with no console errors, no requests, and every facility section visible', async () => {
    expect(problems).toEqual([]);
    expect(requests.filter((url) => !url.startsWith('data:') && url !== 'about:blank')).toEqual([]);
    const sections = page.locator('section.facility');
    expect(await sections.count()).toBe(SAMPLE_REPORT.facilities.length);
    for (let i = 0; i < SAMPLE_REPORT.facilities.length; i++) {
      await expect.poll(() => sections.nth(i).isVisible()).toBe(true);
      expect(await sections.nth(i).getAttribute('data-facility-id')).toBe(SAMPLE_REPORT.facilities[i]!.id);
    }
    expect(await page.title()).toContain(SAMPLE_REPORT.organisation.name);
  });

  it('draws every chart with a nonzero box', async () => {
    const charts = page.locator('figure.chart svg');
    const guarantees = SAMPLE_REPORT.facilities.reduce((n, f) => n + f.guarantees.length, 0);
    const metersWithFigures = SAMPLE_REPORT.facilities
      .flatMap((f) => f.meters)
      .filter((m) => m.missing === null).length;
    expect(await charts.count()).toBe(guarantees + 3 * metersWithFigures);
    for (let i = 0; i < (await charts.count()); i++) {
      const box = await charts.nth(i).boundingBox();
      expect(box, `chart ${i}`).not.toBeNull();
      expect(box!.width).toBeGreaterThan(100);
      expect(box!.height).toBeGreaterThan(50);
    }
    // Bars are drawn, not just declared: the first actual-use bar has height.
    const bar = await page.locator('svg[data-chart="period-comparison"] rect.bar-actual').first().boundingBox();
    expect(bar!.height).toBeGreaterThan(1);
  });

  it('reads the totals back from the DOM exactly as the report has them', async () => {
    const found = await page.$$eval('[data-total]', (cells) =>
      cells.map((c) => [c.getAttribute('data-total')!, c.getAttribute('data-value')] as const),
    );
    const values = new Map(found);
    expect(values.size).toBe(found.length);
    for (const [key, value] of expectedTotals(SAMPLE_REPORT)) {
      expect([key, values.get(key)]).toEqual([key, value]);
      expect(Number(values.get(key))).toBe(Number(value));
    }
  });

  it('saves a full-page screenshot', async () => {
    mkdirSync(ARTIFACTS, { recursive: true });
    const path = `${ARTIFACTS}report-sample.png`;
    await page.screenshot({ path, fullPage: true });
    // common practice: every PNG file starts with the eight-byte signature 89 50 4E 47 0D 0A 1A 0A.
    expect(readFileSync(path).subarray(0, 8).toString('hex')).toBe('89504e470d0a1a0a');
  });

  it('applies the print styles: page breaks before facilities, nothing wider than an A4 page', async () => {
    await page.emulateMedia({ media: 'print' });
    await page.setViewportSize({ width: A4_CONTENT_WIDTH_PX, height: 1000 });
    // Page scripts as text: the project's TypeScript has no DOM library, and these run in the page.
    const breaks = await page.evaluate(
      "[...document.querySelectorAll('section.facility, section.methods')].map((s) => getComputedStyle(s).breakBefore)",
    );
    expect(breaks).toEqual(Array(SAMPLE_REPORT.facilities.length + 1).fill('page'));
    const overflow = await page.evaluate('document.documentElement.scrollWidth - document.documentElement.clientWidth');
    expect(overflow).toBeLessThanOrEqual(0);
    await page.setViewportSize({ width: 1100, height: 900 });
    await page.emulateMedia({ media: 'screen' });
  });

  it('prints to a PDF of a reasonable number of A4 pages', async () => {
    const pdf = await page.pdf({ format: 'A4', printBackground: true });
    mkdirSync(ARTIFACTS, { recursive: true });
    writeFileSync(`${ARTIFACTS}report-sample.pdf`, pdf);
    expect(pdf.subarray(0, 5).toString('latin1')).toBe('%PDF-'); // common practice: the PDF header
    const pages = (pdf.toString('latin1').match(/\/Type\s*\/Page\b/g) ?? []).length;
    // Title and portfolio, at least a page per facility, then methods: at least 4 here; a sprawling layout would show as many more.
    expect(pages).toBeGreaterThanOrEqual(SAMPLE_REPORT.facilities.length + 2);
    expect(pages).toBeLessThanOrEqual(24);
  });
});
