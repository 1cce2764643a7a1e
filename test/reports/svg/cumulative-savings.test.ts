/**
 * The cumulative-savings chart as a pure function. Check values: synthetic
 * chart data whose truth the test sets, hand-worked positions on the date
 * and value axes, and common practice (XML 1.0 well-formedness).
 */
import { describe, it, expect } from 'vitest';
import { renderCumulativeSavingsSvg, type CumulativeSavingsData } from '../../../src/reports/svg/cumulative-savings.js';
import { dateTicks, dayOf, shortDate } from '../../../src/reports/svg/date-axis.js';
import { count, nonFiniteTokens, wellFormedProblems } from './xml-checks.js';

// synthetic: the test sets the truth (a contract year, three quarters counted, guarantee 100 ± 10 around the last point).
const CHART: CumulativeSavingsData = {
  title: 'Boiler plant & "east" wing',
  unit: 'MMBtu',
  yearStart: '2025-07-01',
  yearEnd: '2026-07-01',
  guaranteed: 100,
  uncertainty: 10,
  points: [
    { end: '2025-10-01', value: 20 },
    { end: '2026-01-01', value: 45 },
    { end: '2026-04-01', value: 70 },
  ],
};

describe('renderCumulativeSavingsSvg', () => {
  const svg = renderCumulativeSavingsSvg(CHART);

  it('is well-formed SVG with its data-chart name and a title', () => {
    expect(wellFormedProblems(svg)).toEqual([]);
    expect(svg).toContain('data-chart="cumulative-savings"');
    expect(svg).toContain('<title>Boiler plant &amp; &quot;east&quot; wing</title>');
    expect(nonFiniteTokens(svg)).toEqual([]);
  });

  it('draws a mark per point, the line from zero, the guarantee and the band', () => {
    expect(count(svg, 'class="mark-cumulative"')).toBe(3); // synthetic: three points
    const line = /<polyline class="cumulative-line" points="([^"]+)"/.exec(svg);
    expect(line![1]!.trim().split(/\s+/)).toHaveLength(4); // synthetic: the origin and three points
    expect(count(svg, 'class="guarantee-line"')).toBe(1);
    expect(count(svg, 'class="uncertainty-band"')).toBe(1);
    expect(svg).toContain('Guaranteed 100.0 MMBtu');
  });

  it('places points by date across the whole year', () => {
    // hand-worked: plot 88..732 (644 px) over 365 days; 2025-10-01 is day 92 → 88 + 92/365 × 644 = 250.32.
    expect(svg).toContain('cx="250.32"');
    // hand-worked: the line starts at the year's start, x = 88.
    expect(svg).toMatch(/class="cumulative-line" points="88,/);
  });

  it('puts the guarantee on the value axis', () => {
    // hand-worked: values 0..100 with 6% headroom → 106 → step 25, axis 0..125;
    // plot height (420 − 96) − 78 = 246 px; y(100) = 324 − 100/125 × 246 = 127.2.
    expect(svg).toMatch(/<line class="guarantee-line" x1="88" y1="127.2"/);
  });

  it('spans the band ± the uncertainty around the last point', () => {
    // hand-worked: y(80) = 324 − 80/125 × 246 = 166.56; y(60) = 324 − 60/125 × 246 = 205.92 → height 39.36.
    expect(svg).toMatch(/class="uncertainty-band" x="[\d.]+" y="166.56" width="16" height="39.36"/);
  });

  it('handles an empty year: no marks, no band, a note, still the guarantee', () => {
    const empty = renderCumulativeSavingsSvg({ ...CHART, points: [] });
    expect(wellFormedProblems(empty)).toEqual([]);
    expect(count(empty, 'class="mark-cumulative"')).toBe(0);
    expect(count(empty, 'class="uncertainty-band"')).toBe(0);
    expect(count(empty, 'class="guarantee-line"')).toBe(1);
    expect(empty).toContain('No reporting periods counted yet');
    expect(nonFiniteTokens(empty)).toEqual([]);
  });

  it('handles no guarantee and no uncertainty', () => {
    const bare = renderCumulativeSavingsSvg({ ...CHART, guaranteed: null, uncertainty: null });
    expect(wellFormedProblems(bare)).toEqual([]);
    expect(count(bare, 'class="guarantee-line"')).toBe(0);
    expect(count(bare, 'class="uncertainty-band"')).toBe(0);
    expect(bare).not.toContain('Guaranteed');
    const nothing = renderCumulativeSavingsSvg({ ...CHART, guaranteed: null, uncertainty: null, points: [] });
    expect(wellFormedProblems(nothing)).toEqual([]);
    expect(nonFiniteTokens(nothing)).toEqual([]);
  });

  it('survives unusable dates, negative savings and hostile text', () => {
    const odd = renderCumulativeSavingsSvg({
      title: `<script>alert('x')</script>`,
      unit: 'kWh & co',
      yearStart: 'soon',
      yearEnd: '2026-02-30',
      guaranteed: Number.NaN,
      uncertainty: Number.POSITIVE_INFINITY,
      points: [
        { end: '2026-01-01', value: -40 },
        { end: 'never', value: 12 },
        { end: '2026-02-01', value: Number.NaN },
      ],
    });
    expect(wellFormedProblems(odd)).toEqual([]);
    expect(odd).not.toContain('<script>');
    expect(odd).toContain('kWh &amp; co');
    expect(count(odd, 'class="mark-cumulative"')).toBe(1); // synthetic: one usable point
    expect(count(odd, 'class="zero-line"')).toBe(1); // the axis goes below zero
    expect(nonFiniteTokens(odd)).toEqual([]);
  });
});

describe('date axis', () => {
  it('ticks every second month across a contract year', () => {
    const ticks = dateTicks(dayOf('2025-07-01')!, dayOf('2026-07-01')!);
    // hand-worked: 13 month starts → every 2nd keeps it at 7 ticks or fewer: Jul, Sep, Nov, Jan, Mar, May, Jul.
    expect(ticks.map((t) => t.label)).toEqual(['Jul 2025', 'Sep', 'Nov', 'Jan 2026', 'Mar', 'May', 'Jul']);
  });

  it('ticks every month across a quarter and starts at the next month start', () => {
    // hand-worked: 2026-01-15..2026-04-01 holds the month starts Feb, Mar, Apr.
    expect(dateTicks(dayOf('2026-01-15')!, dayOf('2026-04-01')!).map((t) => t.label)).toEqual([
      'Feb 2026',
      'Mar',
      'Apr',
    ]);
    expect(dateTicks(10, 5)).toEqual([]);
  });

  it('writes short dates without a locale', () => {
    expect(shortDate('2025-07-01')).toBe('1 Jul 2025'); // hand-worked
    expect(shortDate('not a date')).toBe('not a date');
  });
});
