/**
 * The period-comparison chart as a pure function. Check values: synthetic
 * chart data whose truth the test sets, hand-worked axis and bar geometry,
 * and common practice (XML 1.0 well-formedness and predefined entities).
 */
import { describe, it, expect } from 'vitest';
import { renderPeriodComparisonSvg, type PeriodComparisonData } from '../../../src/reports/svg/period-comparison.js';
import { count, nonFiniteTokens, wellFormedProblems } from './xml-checks.js';

// synthetic: the test sets the truth (four invented monthly periods, one outside the baseline's range).
const CHART: PeriodComparisonData = {
  title: 'Pump house <B> & "west" meter',
  unit: 'kWh',
  periods: [
    { start: '2030-01-01', end: '2030-02-01', actual: 80, adjustedBaseline: 100, outsideBaselineRange: false },
    { start: '2030-02-01', end: '2030-03-01', actual: 90, adjustedBaseline: 120, outsideBaselineRange: true },
    { start: '2030-03-01', end: '2030-04-01', actual: 70, adjustedBaseline: 85, outsideBaselineRange: false },
    { start: '2030-04-01', end: '2030-05-01', actual: 60, adjustedBaseline: 75, outsideBaselineRange: false },
  ],
};

const months = (n: number) =>
  Array.from({ length: n }, (_, i) => {
    const iso = (k: number) => `${2030 + Math.floor(k / 12)}-${String((k % 12) + 1).padStart(2, '0')}-01`;
    return { start: iso(i), end: iso(i + 1), actual: 50 + i, adjustedBaseline: 60 + i, outsideBaselineRange: false };
  });

describe('renderPeriodComparisonSvg', () => {
  const svg = renderPeriodComparisonSvg(CHART);

  it('is well-formed SVG with its data-chart name, a title and a description', () => {
    expect(wellFormedProblems(svg)).toEqual([]);
    expect(svg.startsWith('<svg xmlns="http://www.w3.org/2000/svg"')).toBe(true);
    expect(svg).toContain('data-chart="period-comparison"');
    expect(svg).toMatch(/<title>[^<]+<\/title>\s*<desc>/);
    expect(nonFiniteTokens(svg)).toEqual([]);
  });

  it('draws one pair of bars per period and marks the period outside the range', () => {
    expect(count(svg, 'class="bar-actual"')).toBe(4); // synthetic: four periods
    expect(count(svg, 'class="bar-baseline"')).toBe(4); // synthetic: four periods
    expect(count(svg, 'class="mark-outside"')).toBe(1); // synthetic: one period outside
    expect(count(svg, 'class="band-outside"')).toBe(1); // synthetic: one period outside
    expect(svg).toContain('Outside the baseline&#39;s temperature range');
  });

  it('scales bars from zero on round ticks', () => {
    // hand-worked: data 0..120 over ~6 ticks → rough step 24 → step 25, axis 0..125.
    for (const tick of ['>0<', '>25<', '>50<', '>75<', '>100<', '>125<']) expect(svg).toContain(tick);
    // hand-worked: plot height = (420 − 104) − 78 = 238 px; a bar of 100 is 100/125 × 238 = 190.4 px tall,
    // its top at 316 − 190.4 = 125.6.
    expect(svg).toMatch(/<rect class="bar-baseline" x="[\d.]+" y="125.6" width="[\d.]+" height="190.4">/);
  });

  it('labels the axis with the unit and the periods with their start dates', () => {
    expect(svg).toContain('Use per period (kWh)');
    expect(svg).toContain('>1 Jan<'); // hand-worked: 2030-01-01
    expect(svg).toContain('>2030<'); // the year under the first label
    expect(svg).toContain('Adjusted baseline');
    expect(svg).toContain('Actual use');
  });

  it('escapes the title (user text)', () => {
    expect(svg).toContain('Pump house &lt;B&gt; &amp; &quot;west&quot; meter');
    expect(svg).not.toContain('<B>');
  });

  it('draws an empty chart without bars, marks or non-finite numbers', () => {
    const empty = renderPeriodComparisonSvg({ ...CHART, periods: [] });
    expect(wellFormedProblems(empty)).toEqual([]);
    expect(count(empty, 'class="bar-actual"')).toBe(0);
    expect(empty).toContain('No reporting periods');
    expect(empty).not.toContain('Outside the baseline');
    expect(nonFiniteTokens(empty)).toEqual([]);
  });

  it('survives non-finite input values and a hostile title', () => {
    const odd = renderPeriodComparisonSvg({
      title: `]]><script>alert('x')</script>\u0001&#`,
      unit: 'm3 <gas>',
      periods: [
        {
          start: 'not a date',
          end: '2030-02-01',
          actual: Number.NaN,
          adjustedBaseline: Number.POSITIVE_INFINITY,
          outsideBaselineRange: true,
        },
      ],
    });
    expect(wellFormedProblems(odd)).toEqual([]);
    expect(odd).not.toContain('<script>');
    expect(odd).toContain('m3 &lt;gas&gt;');
    expect(nonFiniteTokens(odd)).toEqual([]);
  });

  it('labels at most fourteen periods', () => {
    const long = renderPeriodComparisonSvg({ ...CHART, periods: months(36) });
    const labels = long.slice(long.indexOf('<g class="period-labels"'));
    // hand-worked: 36 periods, every ceil(36 / 14) = 3rd labelled → 12 tick marks.
    expect(count(labels.slice(0, labels.indexOf('</g>')), '<line')).toBe(12);
    expect(count(long, 'class="bar-actual"')).toBe(36); // synthetic: 36 periods
  });
});
