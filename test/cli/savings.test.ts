/**
 * `mvledger savings` in-process. Sources of the check values: numbers come
 * from "the engine itself" (analyseSavings called directly on the same
 * records); exit codes, keys and report wording are the CLI's own contract
 * (src/cli/main.ts, the engine's savings.ts); data are synthetic
 * (test/cli/helpers.ts sets the truth).
 */
import { afterAll, describe, expect, it } from 'vitest';
import { analyseBaseline, analyseSavings } from '../../src/engine/index.js';
import { CAUTION } from '../../src/cli/format/caution.js';
import { toJsonDocument } from '../../src/cli/format/json.js';
import { asJson, makeTempFolder, readingsCsv, runCli, syntheticBills, syntheticWeather, weatherCsv } from './helpers.js';

const folder = makeTempFolder();
afterAll(() => folder.remove());

const weather = syntheticWeather();
const baselineBills = syntheticBills(weather, 2022, 24);
const reportingBills = syntheticBills(weather, 2024, 12, 0.88); // synthetic: the test sets 12% less use
const baselineFile = folder.write('baseline.csv', readingsCsv(baselineBills));
const reportingFile = folder.write('reporting.csv', readingsCsv(reportingBills));
const weatherFile = folder.write('weather.csv', weatherCsv(weather));
const files = ['--baseline', baselineFile, '--reporting', reportingFile, '--weather', weatherFile];

describe('mvledger savings --json', () => {
  it('prints the engine’s savings document, number for number', async () => {
    const run = await runCli(['savings', ...files, '--json', '--confidence', '0.9']);
    expect(run.code).toBe(0);
    expect(run.stderr).toBe('');
    // Source: the engine itself, called directly on the same records.
    const expected = analyseSavings(analyseBaseline(baselineBills, weather), reportingBills, weather, { confidence: 0.9 });
    const printed = JSON.parse(run.stdout) as Record<string, unknown>;
    expect(printed).toEqual(asJson(expected));
    expect(Object.keys(printed)).toEqual(expect.arrayContaining(['model', 'periods', 'totals']));
  });

  it('has the documented period and totals keys, at the default 68% confidence', async () => {
    const run = await runCli(['savings', ...files, '--json']);
    const printed = JSON.parse(run.stdout) as { periods: Record<string, unknown>[]; totals: Record<string, unknown> & { uncertainty: Record<string, Record<string, unknown>> } };
    expect(printed.periods).toHaveLength(12);
    for (const key of ['start', 'end', 'days', 'meanTemp', 'actual', 'adjustedBaseline', 'savings', 'outsideBaselineRange']) expect(printed.periods[0]).toHaveProperty(key);
    for (const key of ['actual', 'adjustedBaseline', 'savings', 'fractionSaved', 'confidence', 'uncertainty', 'significant', 'outsideRangeShare']) expect(printed.totals).toHaveProperty(key);
    for (const formula of ['guideline14', 'exact']) {
      expect(printed.totals.uncertainty[formula]).toHaveProperty('fractional');
      expect(printed.totals.uncertainty[formula]).toHaveProperty('absolute');
    }
    expect(printed.totals.confidence).toBe(0.68); // the engine's default, the Guideline 14 significance level
  });

  it('uses the shape named by --model instead of the selected one', async () => {
    const run = await runCli(['savings', ...files, '--json', '--model', '3PH']);
    expect(run.code).toBe(0);
    // Source: the engine itself with the same override.
    const expected = analyseSavings(analyseBaseline(baselineBills, weather), reportingBills, weather, { model: '3PH' });
    const printed = JSON.parse(run.stdout) as { model: string; baseline: { selected: string } };
    expect(printed).toEqual(asJson(expected));
    expect(printed.model).toBe('3PH');
    expect(printed.baseline.selected).toBe('3PH');
  });

  it('refuses a --model shape that could not be fitted', async () => {
    // Synthetic: three bills leave no room for a 5P fit with 3 points per segment.
    const short = folder.write('short-baseline.csv', readingsCsv(baselineBills.slice(0, 3)));
    const run = await runCli(['savings', '--baseline', short, '--reporting', reportingFile, '--weather', weatherFile, '--model', '5P']);
    expect(run.code).toBe(2);
    expect(run.stdout).toBe('');
    expect(run.stderr).toMatch(/^mvledger: --model 5P: the 5P shape could not be fitted/);
    expect(run.stderr.trimEnd().split('\n')).toHaveLength(1);
  });
});

describe('mvledger savings, text report', () => {
  it('shows each reporting period, the totals, both uncertainties and the caution', async () => {
    const run = await runCli(['savings', ...files, '--confidence', '0.95']);
    expect(run.code).toBe(0);
    for (const bill of reportingBills) expect(run.stdout).toContain(`${bill.start}  ${bill.end}`);
    expect(run.stdout).toContain('Adjusted baseline');
    expect(run.stdout).toContain('Uncertainty at 95% confidence');
    expect(run.stdout).toContain('Guideline 14 Annex B formula');
    expect(run.stdout).toContain('Exact regression variance');
    expect(run.stdout).toMatch(/Significance: the savings are (meaningful|NOT distinguishable)/);
    expect(run.stdout).toContain('Extrapolation:');
    expect(run.stdout.trimEnd().endsWith(CAUTION)).toBe(true);
  });

  it('marks a reporting period outside the baseline temperature range', async () => {
    // Synthetic: a week of 120 °F, hotter than any baseline month.
    const hotWeather = weather.map((d) => (d.date >= '2024-07-01' && d.date < '2024-07-08' ? { date: d.date, temp: 120 } : d));
    const hotFile = folder.write('weather-hot.csv', weatherCsv(hotWeather));
    const hotBills = [{ start: '2024-07-01', end: '2024-07-08', quantity: 9000 }];
    const billFile = folder.write('hot-week.csv', readingsCsv(hotBills));
    const run = await runCli(['savings', '--baseline', baselineFile, '--reporting', billFile, '--weather', hotFile]);
    expect(run.code).toBe(0);
    expect(run.stdout).toMatch(/2024-07-01 {2}2024-07-08 +7 +120\.0\*/);
    expect(run.stdout).toContain('Extrapolation: 100.0%'); // synthetic: the only period is outside the range
  });
});

describe('confidence levels', () => {
  it('refuses a confidence the engine does not offer', async () => {
    const run = await runCli(['savings', ...files, '--confidence', '0.5']);
    expect(run.code).toBe(2);
    expect(run.stdout).toBe('');
    expect(run.stderr).toBe('mvledger: --confidence must be one of 0.68, 0.8, 0.9, 0.95, got "0.5"\n'); // the engine's CONFIDENCE_LEVELS
  });
});

describe('JSON of non-finite numbers', () => {
  it('prints null for the fractional uncertainty of zero savings', async () => {
    // Synthetic: the bill is set to the engine's own adjusted baseline, so the savings are exactly zero.
    const bill = { start: '2024-03-01', end: '2024-04-01', quantity: 0 };
    const analysis = analyseBaseline(baselineBills, weather);
    bill.quantity = analyseSavings(analysis, [bill], weather).periods[0]!.adjustedBaseline;
    const file = folder.write('zero-savings.csv', readingsCsv([bill]));
    const run = await runCli(['savings', '--baseline', baselineFile, '--reporting', file, '--weather', weatherFile, '--json']);
    expect(run.code).toBe(0);
    const printed = JSON.parse(run.stdout) as { totals: { savings: number; uncertainty: { exact: { fractional: unknown } } } };
    expect(printed.totals.savings).toBe(0);
    expect(printed.totals.uncertainty.exact.fractional).toBeNull(); // the engine gives Infinity: ΔS / 0
  });


  it('writes NaN and ±Infinity as null, keeping the document parseable', () => {
    // Hand-worked: JSON has no NaN or Infinity.
    const text = toJsonDocument({ a: Number.NaN, b: Number.POSITIVE_INFINITY, c: [Number.NEGATIVE_INFINITY, 1.5] });
    expect(JSON.parse(text)).toEqual({ a: null, b: null, c: [null, 1.5] });
    expect(text.endsWith('}\n')).toBe(true);
  });
});
