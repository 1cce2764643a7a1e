/**
 * The printable HTML report from a hand-built report (synthetic: the
 * fixture sets every number). Checks are on the markup itself: structure and
 * order, charts per meter, escaping of user text, the caution, and totals
 * that a machine can read back exactly.
 */
import { describe, it, expect } from 'vitest';
import { renderReportHtml } from '../../../src/reports/html/render-report.js';
import { escapeXml } from '../../../src/reports/svg/xml.js';
import {
  CAUTION,
  HOSTILE_FACILITY_NAME,
  HOSTILE_REASON,
  IDS,
  LIBRARY_OVERRIDE_REASON,
  MISSING_REASON,
  SAMPLE_REPORT,
} from '../fixtures/sample-report.js';
import { expectedTotals } from '../fixtures/expected-totals.js';
import { count, wellFormedProblems } from '../svg/xml-checks.js';

const report = SAMPLE_REPORT;
const html = renderReportHtml(report);

/** The markup of the element that starts at the first match of `opening`, up to its matching close tag. */
function elementAt(markup: string, opening: string, name: string): string {
  const start = markup.indexOf(opening);
  if (start === -1) throw new Error(`not found: ${opening}`);
  const tags = new RegExp(`<(/?)${name}\\b[^>]*>`, 'g');
  tags.lastIndex = start;
  let depth = 0;
  for (let m = tags.exec(markup); m !== null; m = tags.exec(markup)) {
    depth += m[1] === '/' ? -1 : 1;
    if (depth === 0) return markup.slice(start, m.index + m[0].length);
  }
  throw new Error(`unclosed: ${opening}`);
}

/** All data-total keys with their data-value (absent value → null), in document order. */
function totals(markup: string): [string, string | null][] {
  return [...markup.matchAll(/<t[dh]\b[^>]*\bdata-total="([^"]*)"([^>]*)>/g)].map((m) => [
    m[1]!,
    /data-value="([^"]*)"/.exec(m[2]!)?.[1] ?? null,
  ]);
}

describe('renderReportHtml', () => {
  it('is one self-contained HTML5 document: no scripts, nothing fetched', () => {
    expect(html.startsWith('<!DOCTYPE html>\n<html lang="en">')).toBe(true);
    expect(count(html, '<html')).toBe(1);
    expect(html).toContain('<meta charset="utf-8">');
    expect(html).toMatch(/<style>[\s\S]*@media print[\s\S]*<\/style>/);
    expect(html.toLowerCase()).not.toContain('<script');
    expect(html).not.toMatch(/\b(?:src|srcset)=|<link\b|@import|url\(|<iframe|<object|<embed/i);
    // The only absolute address is the SVG namespace (a name, not a resource).
    const addresses = [...html.matchAll(/https?:\/\/[^"\s<]+/g)].map((m) => m[0]);
    expect(new Set(addresses)).toEqual(new Set(['http://www.w3.org/2000/svg']));
    expect(addresses.length).toBe(count(html, '<svg'));
  });

  it('is balanced markup throughout (void <meta> aside)', () => {
    const asXml = html.replace('<!DOCTYPE html>', '').replace(/<meta\b([^>]*)>/g, '<meta$1/>');
    expect(wellFormedProblems(asXml)).toEqual([]);
  });

  it('opens with the title block: organisation, window, confidence, data as of, content hash', () => {
    const header = elementAt(html, '<header class="title-block"', 'header');
    expect(header).toContain(escapeXml(report.organisation.name));
    expect(header).toContain(report.window.label);
    expect(header).toContain('90% two-sided'); // synthetic: the fixture's confidence is 0.9
    expect(header).toContain(`audit sequence ${report.dataAsOf.auditSeq}`);
    expect(header).toContain(report.dataAsOf.auditHash);
    expect(header).toContain(report.contentHash);
  });

  it('puts the portfolio summary before the first facility, and one section per facility in order', () => {
    const portfolio = html.indexOf('<section class="portfolio"');
    const firstFacility = html.indexOf('<section class="facility"');
    expect(portfolio).toBeGreaterThan(html.indexOf('<header class="title-block"'));
    expect(portfolio).toBeLessThan(firstFacility);
    const ids = [...html.matchAll(/<section class="facility" id="[^"]*" data-facility-id="([^"]*)"/g)].map((m) => m[1]);
    expect(ids).toEqual(report.facilities.map((f) => f.id));
    expect(html.indexOf('<section class="methods"')).toBeGreaterThan(html.lastIndexOf('<section class="facility"'));
  });

  it('shows three charts for every meter with figures', () => {
    let withFigures = 0;
    for (const facility of report.facilities) {
      for (const meter of facility.meters) {
        const article = elementAt(html, `<article class="meter" id="meter-${meter.id}"`, 'article');
        if (meter.missing !== null) {
          expect(count(article, '<figure')).toBe(0);
          continue;
        }
        withFigures++;
        expect(count(article, '<figure class="chart"')).toBe(3);
        expect([...article.matchAll(/data-figure="([^"]+)"/g)].map((m) => m[1])).toEqual([
          'period-comparison',
          'cumulative-savings',
          'signature',
        ]);
        expect(count(article, 'data-chart="period-comparison"')).toBe(1);
        expect(count(article, 'data-chart="cumulative-savings"')).toBe(1);
        expect(count(article, 'class="bar-actual"')).toBe(meter.periods.length);
        expect(count(article, 'data-outside="true"')).toBe(meter.periods.filter((p) => p.outsideBaselineRange).length);
      }
    }
    expect(withFigures).toBe(2); // synthetic: two of the three meters have figures
  });

  it('shows each facility guarantee with its cumulative chart, and "year not complete" for a partial year', () => {
    expect(count(html, 'data-figure="guarantee-cumulative"')).toBe(
      report.facilities.reduce((n, f) => n + f.guarantees.length, 0),
    );
    const hall = elementAt(html, `<section class="facility" id="facility-${IDS.hall}"`, 'section');
    expect(hall).toContain('Year not complete'); // synthetic: the hall's year 1 runs to 2026-10-01
    expect(hall).toContain('Behind so far (year not complete)');
    const library = elementAt(html, `<section class="facility" id="facility-${IDS.library}"`, 'section');
    expect(library).toContain('The year is complete');
    expect(library).toContain('>Surplus<'); // synthetic: about 230.9 MMBtu measured against 160 guaranteed, beyond the ± 31.4 band
  });

  it('lists every non-routine adjustment with its reason, escaped', () => {
    const adjustments = report.facilities.flatMap((f) => f.meters.flatMap((m) => m.adjustments));
    expect(adjustments.length).toBe(3); // synthetic: the fixture records three
    for (const a of adjustments) {
      expect(html).toContain(`data-adjustment-id="${a.id}"`);
      expect(html).toContain(escapeXml(a.reason));
    }
    expect(html).not.toContain(HOSTILE_REASON);
    // common practice: the five XML/HTML special characters as entities.
    expect(html).toContain(
      'Temporary &lt;script&gt;alert(&quot;x&quot;)&lt;/script&gt; server room &amp; &#39;overflow&#39; racks added',
    );
  });

  it('escapes names and shows the reason for a meter without figures', () => {
    expect(html).not.toContain(HOSTILE_FACILITY_NAME);
    expect(html).toContain('Orrin Hollow Library &lt;East&gt; &amp; &quot;Annex&quot;');
    const gas = elementAt(html, `<article class="meter" id="meter-${IDS.libraryGas}"`, 'article');
    expect(gas).toContain('data-missing="true"');
    expect(gas).toContain(escapeXml(MISSING_REASON));
    expect(gas).not.toContain('class="periods"');
  });

  it('shows the findings: extrapolation, significance, normalised savings or why not, missing rates, left-out readings', () => {
    const hall = elementAt(html, `<article class="meter" id="meter-${IDS.hallGas}"`, 'article');
    expect(hall).toContain('data-significant="false"');
    expect(hall).toContain(escapeXml('Not available: the reporting periods cover 334 days'));
    expect(hall).toContain('2026-03-01 to 2026-04-01 (end exclusive)');
    expect(hall).toContain('weather coverage 71% is below the 90% threshold');
    const library = elementAt(html, `<article class="meter" id="meter-${IDS.libraryElectricity}"`, 'article');
    expect(library).toContain('data-significant="true"');
    expect(library).toContain('from 2 periods outside the baseline'); // synthetic: December and January lie below 31 °F
    expect(library).toContain('class="summary normalised"');
  });

  it('states each baseline’s temperature form, its notes with the override’s reason, and the parts of a combined ±', () => {
    const library = elementAt(html, `<article class="meter" id="meter-${IDS.libraryElectricity}"`, 'article');
    expect(library).toContain('data-temperature-form="daily"');
    expect(library).toContain('day-resolved: each bill against the mean over its days of the daily response');
    expect(library).toContain('class="plain baseline-notes"');
    expect(library).toContain(escapeXml(`frozen with an extrapolation override, reason: “${LIBRARY_OVERRIDE_REASON}”`));
    expect(library).toContain('combines in quadrature the model’s ± 9,000'); // synthetic: the fixture's parts
    expect(library).toContain('class="stated-uncertainty"');
    // Its signature chart draws the day-resolved model with each bill's expected use.
    expect(count(library, 'class="mark-expected"')).toBe(24); // synthetic: 24 expected values in the fixture
    expect(library).toContain('class="chart-note"');
    const hall = elementAt(html, `<article class="meter" id="meter-${IDS.hallGas}"`, 'article');
    expect(hall).toContain('data-temperature-form="mean"');
    expect(hall).not.toContain('baseline-notes');
    expect(hall).not.toContain('mark-expected');
    expect(html).toContain('data-method="Temperature form"');
    expect(html).toContain('data-method="Baseline length and extrapolation"');
  });

  it('carries the caution at the top and again at the end', () => {
    expect(count(html, escapeXml(CAUTION))).toBe(2);
    expect(html.indexOf(escapeXml(CAUTION))).toBeLessThan(html.indexOf('<section class="portfolio"'));
    expect(html.lastIndexOf(escapeXml(CAUTION))).toBeGreaterThan(html.indexOf('<section class="methods"'));
  });

  it('shows the methods, sources, unit factors, notices, normal years and every frozen baseline with its hash', () => {
    const tail = html.slice(html.indexOf('<section class="methods"'));
    for (const paragraph of Object.values(report.method).filter((v): v is string => typeof v === 'string'))
      expect(tail).toContain(escapeXml(paragraph));
    for (const source of report.method.sources) expect(tail).toContain(escapeXml(source));
    expect(tail).toContain(escapeXml(report.unitFactorSource));
    expect(tail).toContain('>0.00341214<'); // field brief: 1 kWh = 3,412.14 Btu, so 3,412.14 / 10^6 MMBtu
    for (const notice of report.notices) expect(tail).toContain(escapeXml(notice));
    for (const b of report.baselines) expect(tail).toContain(b.contentHash);
    for (const n of report.normalYears) expect(tail).toContain(n.contentHash);
  });

  it('gives every total a unique key and the exact value from the report', () => {
    const found = totals(html);
    const keys = found.map(([key]) => key);
    expect(new Set(keys).size).toBe(keys.length);
    const values = new Map(found);
    const expected = expectedTotals(report);
    // hand-worked: 4 portfolio energy keys + 2 currencies + 2 facilities × 3 + 2 meters with figures × 3 = 18.
    expect(expected.size).toBe(18);
    for (const [key, value] of expected) expect([key, values.get(key)]).toEqual([key, value]);
    expect(values.get('portfolio-savings-MMBtu')).toBe(String(report.portfolio.totals.MMBtu.savings));
  });

  it('is deterministic', () => {
    expect(renderReportHtml(report)).toBe(html);
  });
});
