/**
 * `mvledger savings` in-process. Sources of the check values: numbers come
 * from "the engine itself" (analyseSavings called directly on the same
 * records); exit codes, keys and report wording are the CLI's own contract
 * (src/cli/main.ts, the engine's savings.ts); data are synthetic
 * (test/cli/helpers.ts sets the truth).
 */
import { afterAll, describe, expect, it } from 'vitest';
import {
  alignPeriods,
  analyseBaseline,
  analyseSavings,
  baselineSufficiency,
  NO_OVERRIDES,
  reportingExtrapolation,
  withProjectionChecks,
  type BaselineAnalysis,
  type DailyTemperature,
  type ProjectionOverrides,
  type Reading,
  type SavingsDocument,
} from '../../src/engine/index.js';
import { CAUTION } from '../../src/cli/format/caution.js';
import { toJsonDocument } from '../../src/cli/format/json.js';
import {
  asJson,
  makeTempFolder,
  readingsCsv,
  runCli,
  syntheticBills,
  syntheticWeather,
  weatherCsv,
} from './helpers.js';

const folder = makeTempFolder();
afterAll(() => folder.remove());

const weather = syntheticWeather();
const baselineBills = syntheticBills(weather, 2022, 24);
const reportingBills = syntheticBills(weather, 2024, 12, 0.88); // synthetic: the test sets 12% less use
const baselineFile = folder.write('baseline.csv', readingsCsv(baselineBills));
const reportingFile = folder.write('reporting.csv', readingsCsv(reportingBills));
const weatherFile = folder.write('weather.csv', weatherCsv(weather));
const files = ['--baseline', baselineFile, '--reporting', reportingFile, '--weather', weatherFile];

/** The engine's document with the checks the command states beside it: the engine itself. */
function checked(
  analysis: BaselineAnalysis,
  document: SavingsDocument,
  reporting: readonly Reading[],
  days: readonly DailyTemperature[] = weather,
  overrides: ProjectionOverrides = NO_OVERRIDES,
) {
  const fit = analysis.choice.candidates.find((c) => c.model === document.model)!.fit!;
  return withProjectionChecks(document, {
    sufficiency: baselineSufficiency(analysis.periods),
    extrapolation: reportingExtrapolation(fit, alignPeriods(reporting, days).periods),
    overrides,
  });
}

describe('mvledger savings --json', () => {
  it('prints the engine’s savings document, number for number', async () => {
    const run = await runCli(['savings', ...files, '--json', '--confidence', '0.9']);
    expect(run.code).toBe(0);
    expect(run.stderr).toBe('');
    // Source: the engine itself, called directly on the same records.
    const analysis = analyseBaseline(baselineBills, weather);
    const expected = checked(
      analysis,
      analyseSavings(analysis, reportingBills, weather, { confidence: 0.9 }),
      reportingBills,
    );
    const printed = JSON.parse(run.stdout) as Record<string, unknown>;
    expect(printed).toEqual(asJson(expected));
    expect(Object.keys(printed)).toEqual(expect.arrayContaining(['model', 'periods', 'totals']));
  });

  it('has the documented period and totals keys, at the default 68% confidence', async () => {
    const run = await runCli(['savings', ...files, '--json']);
    const printed = JSON.parse(run.stdout) as {
      periods: Record<string, unknown>[];
      totals: Record<string, unknown> & { uncertainty: Record<string, Record<string, unknown>> };
    };
    expect(printed.periods).toHaveLength(12);
    for (const key of [
      'start',
      'end',
      'days',
      'meanTemp',
      'actual',
      'adjustedBaseline',
      'savings',
      'outsideBaselineRange',
    ])
      expect(printed.periods[0]).toHaveProperty(key);
    for (const key of [
      'actual',
      'adjustedBaseline',
      'savings',
      'fractionSaved',
      'confidence',
      'uncertainty',
      'significant',
      'outsideRangeShare',
    ])
      expect(printed.totals).toHaveProperty(key);
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
    const analysis = analyseBaseline(baselineBills, weather);
    const expected = checked(
      analysis,
      analyseSavings(analysis, reportingBills, weather, { model: '3PH' }),
      reportingBills,
    );
    const printed = JSON.parse(run.stdout) as { model: string; baseline: { selected: string } };
    expect(printed).toEqual(asJson(expected));
    expect(printed.model).toBe('3PH');
    expect(printed.baseline.selected).toBe('3PH');
  });

  it('refuses a --model shape that could not be fitted', async () => {
    // Synthetic: three bills leave no room for a 5P fit with 3 points per segment.
    const short = folder.write('short-baseline.csv', readingsCsv(baselineBills.slice(0, 3)));
    const run = await runCli([
      'savings',
      '--baseline',
      short,
      '--reporting',
      reportingFile,
      '--weather',
      weatherFile,
      '--model',
      '5P',
    ]);
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
    const hotWeather = weather.map((d) =>
      d.date >= '2024-07-01' && d.date < '2024-07-08' ? { date: d.date, temp: 120 } : d,
    );
    const hotFile = folder.write('weather-hot.csv', weatherCsv(hotWeather));
    const hotBills = [{ start: '2024-07-01', end: '2024-07-08', quantity: 9000 }];
    const billFile = folder.write('hot-week.csv', readingsCsv(hotBills));
    // Seven days of 120 °F lie wholly outside the baseline's weather: refused unless overridden (with the reason printed).
    const refused = await runCli([
      'savings',
      '--baseline',
      baselineFile,
      '--reporting',
      billFile,
      '--weather',
      hotFile,
    ]);
    expect(refused.code).toBe(2);
    expect(refused.stdout).toBe('');
    expect(refused.stderr).toMatch(
      /^mvledger: savings refused: the reporting weather lies outside what the baseline saw: 100\.0% of the reporting days \(7 of 7\) .*the limit is 10\.0%.*; give --allow-extrapolation REASON to project anyway\n$/,
    );
    const reason = 'Heat-wave week checked by hand (test)';
    const run = await runCli([
      'savings',
      '--baseline',
      baselineFile,
      '--reporting',
      billFile,
      '--weather',
      hotFile,
      '--allow-extrapolation',
      reason,
    ]);
    expect(run.code).toBe(0);
    expect(run.stdout).toMatch(/2024-07-01 {2}2024-07-08 +7 +120\.0\*/);
    expect(run.stdout).toContain('Extrapolation: 100.0%'); // synthetic: the only period is outside the range
    expect(run.stdout).toContain(`Override --allow-extrapolation: ${reason}`);
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
    const run = await runCli([
      'savings',
      '--baseline',
      baselineFile,
      '--reporting',
      file,
      '--weather',
      weatherFile,
      '--json',
    ]);
    expect(run.code).toBe(0);
    const printed = JSON.parse(run.stdout) as {
      totals: { savings: number; uncertainty: { exact: { fractional: unknown } } };
    };
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

describe('the temperature form', () => {
  it('fits day-resolved by default and in the mean form with --temperature mean, stating it in text and JSON', async () => {
    const daily = JSON.parse((await runCli(['savings', ...files, '--json'])).stdout) as {
      temperatureForm: string;
      baseline: { temperatureForm: string };
    };
    expect(daily.temperatureForm).toBe('daily'); // the engine's default wherever daily weather covers the bills
    expect(daily.baseline.temperatureForm).toBe('daily');
    const run = await runCli(['savings', ...files, '--json', '--temperature', 'mean']);
    expect(run.code).toBe(0);
    // Source: the engine itself, in the mean form.
    const analysis = analyseBaseline(baselineBills, weather, { temperatureForm: 'mean' });
    expect(JSON.parse(run.stdout)).toEqual(
      asJson(checked(analysis, analyseSavings(analysis, reportingBills, weather), reportingBills)),
    );
    const text = await runCli(['savings', ...files, '--temperature', 'mean']);
    expect(text.stdout).toContain('temperature form: mean (each period at its mean temperature)');
    expect((await runCli(['savings', ...files])).stdout).toContain('temperature form: daily (day-resolved');
  });

  it('refuses a form it does not know, naming the option (exit 2)', async () => {
    const run = await runCli(['savings', ...files, '--temperature', 'weekly']);
    expect(run.code).toBe(2);
    expect(run.stdout).toBe('');
    expect(run.stderr).toBe('mvledger: --temperature must be daily or mean, got "weekly"\n');
  });
});

describe('a baseline too short to project from', () => {
  // Synthetic: the six bills of 2022's first half (181 days) cover neither 330 days nor 12 bills.
  const shortFile = folder.write('half-year.csv', readingsCsv(baselineBills.slice(0, 6)));
  const spring = ['--baseline', shortFile, '--reporting', reportingFile, '--weather', weatherFile];

  it('is refused with exit 2 and the reasons, on one line', async () => {
    const run = await runCli(['savings', ...spring]);
    expect(run.code).toBe(2);
    expect(run.stdout).toBe('');
    expect(run.stderr).toMatch(
      /^mvledger: savings refused: the baseline is too short to project from: the baseline's usable periods cover 181 days; a full cycle of seasons needs at least 330/,
    );
    expect(run.stderr).toContain('the baseline has 6 usable bills; at least 12 are needed');
    expect(run.stderr).toContain('give --allow-short-baseline REASON');
    expect(run.stderr.trimEnd().split('\n')).toHaveLength(1);
  });

  it('is projected with --allow-short-baseline, the reason printed in text and JSON', async () => {
    const reason = 'Pilot: half a year of bills only (test)';
    const args = ['savings', ...spring, '--allow-short-baseline', reason, '--allow-extrapolation', 'Pilot (test)'];
    const text = await runCli(args);
    expect(text.code).toBe(0);
    expect(text.stdout).toContain(`Override --allow-short-baseline: ${reason}`);
    expect(text.stdout).toContain('Baseline length: 6 periods, 181 days: too short');
    const json = JSON.parse((await runCli([...args, '--json'])).stdout) as {
      baseline: { overrides: unknown; sufficiency: { sufficient: boolean } };
    };
    expect(json.baseline.overrides).toEqual({ shortBaseline: { reason }, extrapolation: { reason: 'Pilot (test)' } });
    expect(json.baseline.sufficiency.sufficient).toBe(false);
  });

  it('refuses an override without a reason (exit 2, naming the option)', async () => {
    const run = await runCli(['savings', ...spring, '--allow-short-baseline', '  ']);
    expect(run.code).toBe(2);
    expect(run.stderr).toBe('mvledger: --allow-short-baseline needs a REASON: say why the check may be passed over\n');
  });
});
