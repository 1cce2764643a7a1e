/**
 * The energy-signature chart as a pure function. Check values: synthetic
 * chart data whose truth the test sets, hand-worked axis ticks, and common
 * practice (XML 1.0's predefined entities and well-formedness rules).
 */
import { describe, it, expect } from 'vitest';
import { DAY_RESOLVED_NOTE, renderSignatureSvg, type SignatureChartData } from '../../../src/reports/svg/signature.js';
import { axisScale, tickLabel } from '../../../src/reports/svg/ticks.js';
import { escapeXml } from '../../../src/reports/svg/xml.js';
import { wellFormedProblems } from './xml-checks.js';

const count = (text: string, needle: string) => text.split(needle).length - 1;

// synthetic: the test sets the truth (an invented heating-dominated building).
const CHART: SignatureChartData = {
  meterName: 'Plant <A> & "B" main gas',
  model: '3PH',
  version: 2,
  status: 'frozen',
  baselineStart: '2030-01-01',
  baselineEnd: '2032-01-01',
  temperatureUnit: 'F',
  useUnit: 'therm',
  baseline: [
    { temp: 22.4, usePerDay: 61.2, label: '2030-01-01 to 2030-02-01' },
    { temp: 35.1, usePerDay: 44.9 },
    { temp: 48.6, usePerDay: 27.3 },
    { temp: 63.0, usePerDay: 12.2 },
    { temp: 74.8, usePerDay: 11.7 },
  ],
  fittedLine: [
    { temp: 22.4, usePerDay: 61.0 },
    { temp: 60.5, usePerDay: 12.0 },
    { temp: 74.8, usePerDay: 12.0 },
  ],
  reporting: [
    { temp: 28.0, usePerDay: 46.1 },
    { temp: 52.3, usePerDay: 18.4 },
    { temp: 70.2, usePerDay: 10.1 },
  ],
};

describe('renderSignatureSvg', () => {
  const svg = renderSignatureSvg(CHART);

  it('is well-formed XML with an SVG root', () => {
    expect(wellFormedProblems(svg)).toEqual([]);
    expect(svg.startsWith('<svg xmlns="http://www.w3.org/2000/svg"')).toBe(true);
  });

  it('draws one mark per baseline period and a different one per reporting period', () => {
    expect(count(svg, 'class="mark-baseline"')).toBe(5); // synthetic: the test sets the truth
    expect(count(svg, 'class="mark-reporting"')).toBe(3); // synthetic: the test sets the truth
    // Baseline marks are filled circles; reporting marks are hollow diamonds (paths).
    expect(count(svg, '<circle class="mark-baseline"')).toBe(5);
    expect(count(svg, '<path class="mark-reporting"')).toBe(3);
  });

  it('draws the fitted line through every vertex it is given', () => {
    const line = /<polyline class="fit-line" points="([^"]+)"/.exec(svg);
    expect(line).not.toBeNull();
    expect(line![1]!.trim().split(/\s+/)).toHaveLength(3); // synthetic: three vertices given
  });

  it('labels both axes with their units and shows model and version in the title', () => {
    expect(svg).toContain('Mean outdoor temperature (°F)');
    expect(svg).toContain('Use per day (therm/day)');
    expect(svg).toContain('version 2 (frozen), 3PH model');
    expect(svg).toContain('Fitted 3PH model');
    expect(svg).toContain('Reporting periods (3)');
    expect(svg).toContain('<title>2030-01-01 to 2030-02-01</title>');
  });

  it('escapes the meter name (user input)', () => {
    expect(svg).toContain('Plant &lt;A&gt; &amp; &quot;B&quot; main gas');
    expect(svg).not.toContain('<A>');
    expect(svg).not.toContain('"B"');
  });

  it('leaves out the reporting mark and legend entry when there are no reporting periods, and shows °C', () => {
    const draft = renderSignatureSvg({
      ...CHART,
      status: 'draft',
      reporting: [],
      temperatureUnit: 'C',
      useUnit: 'kWh',
    });
    expect(wellFormedProblems(draft)).toEqual([]);
    expect(count(draft, 'class="mark-reporting"')).toBe(0);
    expect(draft).not.toContain('Reporting periods');
    expect(draft).toContain('Mean outdoor temperature (°C)');
    expect(draft).toContain('Use per day (kWh/day)');
  });

  it('stays well-formed with a hostile name and an empty chart', () => {
    const hostile = renderSignatureSvg({
      ...CHART,
      meterName: `]]><script>alert('x')</script>\u0001&#`,
      baseline: [],
      fittedLine: [],
      reporting: [],
    });
    expect(wellFormedProblems(hostile)).toEqual([]);
    expect(hostile).not.toContain('<script>');
  });
});

describe('renderSignatureSvg of a day-resolved model', () => {
  // synthetic: the same building as a day-resolved model; its line runs over the daily temperatures it saw
  // (wider than the bills' means), and each bill's expected use is marked at its mean temperature.
  const DAILY: SignatureChartData = {
    ...CHART,
    temperatureForm: 'daily',
    fittedLine: [
      { temp: 8.1, usePerDay: 75.0 },
      { temp: 60.5, usePerDay: 12.0 },
      { temp: 88.2, usePerDay: 12.0 },
    ],
    expected: [
      { temp: 22.4, usePerDay: 61.1, label: 'baseline 2030-01-01 to 2030-02-01: expected' },
      { temp: 48.6, usePerDay: 28.0 },
      { temp: 63.0, usePerDay: 13.9 },
      { temp: 74.8, usePerDay: 12.1 },
      { temp: 70.2, usePerDay: 12.4 },
    ],
  };
  const svg = renderSignatureSvg(DAILY);

  it('is well-formed, with finite coordinates everywhere', () => {
    expect(wellFormedProblems(svg)).toEqual([]);
    const numbers = [...svg.matchAll(/ (?:x|y|x1|y1|x2|y2|cx|cy|r)="([^"]*)"/g)].map((m) => Number(m[1]));
    expect(numbers.length).toBeGreaterThan(20);
    for (const value of numbers) expect(Number.isFinite(value)).toBe(true);
    for (const path of [...svg.matchAll(/ (?:d|points)="([^"]*)"/g)].map((m) => m[1]!))
      expect(path).not.toMatch(/NaN|Infinity/);
  });

  it('marks each bill’s expected use with a tick of its own, beside the period marks', () => {
    expect(count(svg, 'class="mark-expected"')).toBe(5); // synthetic: five expected values given
    expect(count(svg, '<path class="mark-expected" d="M')).toBe(5);
    expect(count(svg, 'class="mark-baseline"')).toBe(5);
    expect(count(svg, 'class="mark-reporting"')).toBe(3);
    // A tick is a horizontal stroke: M x y H x′.
    expect(/<path class="mark-expected" d="M[\d.]+ [\d.]+H[\d.]+"/.test(svg)).toBe(true);
  });

  it('names the daily response and the expected use in its legend, and says why bills sit above the line', () => {
    expect(svg).toContain('3PH daily response');
    expect(svg).toContain('Expected use of each bill (5)');
    expect(svg).toContain('day-resolved');
    expect(svg).toContain(`class="chart-note"`);
    expect(svg).toContain(escapeXml(DAY_RESOLVED_NOTE));
    expect(DAY_RESOLVED_NOTE).toContain('sits above the line');
    expect(DAY_RESOLVED_NOTE).toContain('convex');
  });

  it('leaves a mean-form chart exactly as it was, expected values or not', () => {
    expect(renderSignatureSvg({ ...CHART, expected: DAILY.expected })).toBe(renderSignatureSvg(CHART));
    expect(renderSignatureSvg({ ...CHART, temperatureForm: 'mean' })).toBe(renderSignatureSvg(CHART));
    expect(renderSignatureSvg(CHART)).not.toContain('mark-expected');
  });

  it('draws no note when there is no bill to mark (daily readings sit on the line)', () => {
    const plain = renderSignatureSvg({ ...DAILY, expected: [] });
    expect(wellFormedProblems(plain)).toEqual([]);
    expect(plain).not.toContain('chart-note');
    expect(plain).not.toContain('Expected use of each bill');
  });
});

describe('axis ticks', () => {
  it('picks round steps that cover the data', () => {
    // hand-worked: a span of 57.7 over ~6 ticks → rough step 11.5 → step 20 (1, 2, 2.5, 5 × 10^k).
    expect(axisScale(31.2, 88.9)).toMatchObject({
      min: 20,
      max: 100,
      step: 20,
      ticks: [20, 40, 60, 80, 100],
      decimals: 0,
    });
    // hand-worked: 0..0.9 → rough 0.18 → step 0.2, one decimal.
    expect(axisScale(0, 0.9)).toMatchObject({ min: 0, max: 1, step: 0.2, decimals: 1 });
    // hand-worked: a single value is widened by 10% each side.
    expect(axisScale(50, 50).ticks.length).toBeGreaterThan(1);
  });

  it('formats labels with grouped thousands and no negative zero', () => {
    expect(tickLabel(12500, 0)).toBe('12,500'); // hand-worked
    expect(tickLabel(-0, 1)).toBe('0.0'); // hand-worked
    expect(tickLabel(2.5, 1)).toBe('2.5'); // hand-worked
  });

  it('escapes the five XML special characters', () => {
    expect(escapeXml(`<a & "b" 'c'>`)).toBe('&lt;a &amp; &quot;b&quot; &#39;c&#39;&gt;'); // common practice (XML 1.0 predefined entities)
  });
});
