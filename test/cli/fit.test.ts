/**
 * `mvledger fit` in-process. Sources of the check values: numbers come from
 * "the engine itself" (analyseBaseline called directly on the same records);
 * exit codes, keys and report wording are the CLI's own contract
 * (src/cli/main.ts, the engine's documents.ts); data are synthetic
 * (test/cli/helpers.ts sets the truth).
 */
import { fileURLToPath } from 'node:url';
import { afterAll, describe, expect, it } from 'vitest';
import { analyseBaseline, fahrenheitToCelsius } from '../../src/engine/index.js';
import { CAUTION } from '../../src/cli/format/caution.js';
import { verdictText } from '../../src/cli/format/fit-report.js';
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
const baseline = syntheticBills(weather, 2022, 24);
const readingsFile = folder.write('baseline.csv', readingsCsv(baseline));
const weatherFile = folder.write('weather.csv', weatherCsv(weather));

describe('mvledger fit --json', () => {
  it('prints the engine’s fit document, number for number', async () => {
    const run = await runCli(['fit', '--readings', readingsFile, '--weather', weatherFile, '--json']);
    expect(run.code).toBe(0);
    expect(run.stderr).toBe('');
    const printed = JSON.parse(run.stdout) as Record<string, unknown>;
    // Source: the engine itself, called directly on the same records.
    expect(printed).toEqual(asJson(analyseBaseline(baseline, weather).document));
    expect(Object.keys(printed)).toEqual(expect.arrayContaining(['selected', 'candidates', 'periods', 'settings']));
    expect(run.stdout.endsWith('}\n')).toBe(true);
  });

  it('gives every candidate the documented keys', async () => {
    const run = await runCli(['fit', '--readings', readingsFile, '--weather', weatherFile, '--json']);
    const printed = JSON.parse(run.stdout) as { candidates: Record<string, unknown>[] };
    expect(printed.candidates.map((c) => c.model)).toEqual(['1P', '2P', '3PC', '3PH', '4P', '5P']); // the engine's six shapes
    for (const candidate of printed.candidates) {
      for (const key of ['model', 'verdict', 'accepted', 'reasons', 'parameters', 'sse', 'n', 'p', 'stats'])
        expect(candidate).toHaveProperty(key);
    }
    const stats = printed.candidates.find((c) => c.stats !== null)!.stats as Record<string, unknown>;
    for (const key of ['r2', 'cvrmse', 'nmbe', 'rmse', 'autocorrelation']) expect(stats).toHaveProperty(key);
  });

  it('passes --coverage, --alpha and --min-points to the engine', async () => {
    const run = await runCli([
      'fit',
      '--readings',
      readingsFile,
      '--weather',
      weatherFile,
      '--json',
      '--coverage',
      '0.8',
      '--alpha',
      '0.01',
      '--min-points',
      '4',
    ]);
    expect(run.code).toBe(0);
    // Source: the engine itself with the same options.
    const expected = analyseBaseline(baseline, weather, {
      minCoverage: 0.8,
      significanceLevel: 0.01,
      minPointsPerSegment: 4,
    }).document;
    expect(JSON.parse(run.stdout)).toEqual(asJson(expected));
  });
});

describe('mvledger fit --temperature', () => {
  it('fits day-resolved by default and in the mean form when asked, stating the form in JSON and text', async () => {
    const daily = JSON.parse(
      (await runCli(['fit', '--readings', readingsFile, '--weather', weatherFile, '--json'])).stdout,
    ) as {
      temperatureForm: string;
    };
    expect(daily.temperatureForm).toBe('daily'); // the engine's default for bills with daily weather
    const run = await runCli([
      'fit',
      '--readings',
      readingsFile,
      '--weather',
      weatherFile,
      '--json',
      '--temperature',
      'mean',
    ]);
    expect(run.code).toBe(0);
    // Source: the engine itself in the mean form.
    expect(JSON.parse(run.stdout)).toEqual(
      asJson(analyseBaseline(baseline, weather, { temperatureForm: 'mean' }).document),
    );
    const text = await runCli(['fit', '--readings', readingsFile, '--weather', weatherFile, '--temperature', 'MEAN']);
    expect(text.stdout).toContain('  temperature form: mean (each period at its mean temperature)');
    expect((await runCli(['fit', '--readings', readingsFile, '--weather', weatherFile])).stdout).toContain(
      '  temperature form: daily (day-resolved',
    );
  });

  it('says when the baseline is too short to project from, and still fits it', async () => {
    // Synthetic: five bills of 2022 (151 days).
    const short = folder.write('five-bills.csv', readingsCsv(baseline.slice(0, 5)));
    const run = await runCli(['fit', '--readings', short, '--weather', weatherFile]);
    expect(run.code).toBe(0);
    expect(run.stdout).toContain('  baseline length: 5 periods, 151 days: too short to project from');
    expect(run.stdout).toContain('refuses it without --allow-short-baseline REASON');
    expect((await runCli(['fit', '--readings', readingsFile, '--weather', weatherFile])).stdout).toContain(
      '  baseline length: 24 periods, 730 days: covers a full cycle of seasons',
    ); // hand-worked: 2022 and 2023, 365 days each
  });
});

describe('mvledger fit, text report', () => {
  it('shows a row per shape, the reasons, the Guideline 14 check and the caution', async () => {
    const run = await runCli(['fit', '--readings', readingsFile, '--weather', weatherFile]);
    expect(run.code).toBe(0);
    expect(run.stderr).toBe('');
    const lines = run.stdout.split('\n');
    for (const model of ['1P', '2P', '3PC', '3PH', '4P', '5P']) {
      expect(lines.some((line) => line.startsWith(`${model} `))).toBe(true);
    }
    const selected = analyseBaseline(baseline, weather).document.selected; // source: the engine itself
    expect(run.stdout).toContain(`Selected shape: ${selected}`);
    expect(run.stdout).toContain('CV(RMSE) %');
    expect(run.stdout).toContain('Guideline 14 acceptance of the selected shape');
    expect(run.stdout).toContain('from memory'); // the engine's source label for the limits
    expect(run.stdout).toContain(CAUTION);
  });
});

describe('the fit text called a passing runner-up "accepted" and left out the Durbin–Watson the README promises', () => {
  it('says "passed, not chosen" for a shape that passed but was not selected, and prints each shape\'s Durbin–Watson', async () => {
    const run = await runCli(['fit', '--readings', readingsFile, '--weather', weatherFile]);
    expect(run.code).toBe(0);
    const document = analyseBaseline(baseline, weather).document; // source: the engine itself
    const lines = run.stdout.split('\n');
    expect(run.stdout).toContain('Durbin–Watson');
    for (const candidate of document.candidates) {
      const row = lines.find((line) => line.startsWith(`${candidate.model} `))!;
      if (candidate.stats) expect(row).toContain(candidate.stats.durbinWatson.toFixed(2));
      if (candidate.verdict === 'accepted') {
        expect(row).toContain('passed, not chosen');
        expect(run.stdout).toContain(`  ${candidate.model} (passed, not chosen)`);
      }
    }
    expect(lines.filter((line) => /^\S+ +accepted /.test(line))).toEqual([]);
    // the CLI's own words for the engine's codes
    expect(verdictText('accepted')).toBe('passed, not chosen');
    expect(verdictText('not-fitted')).toBe('not fitted');
  });
});

describe('periods left out', () => {
  it('are listed in the text report with their file row and reason', async () => {
    // Synthetic: March 2022 (file row 4 of the readings) loses its weather entirely.
    const gappy = weather.filter((d) => !(d.date >= '2022-03-01' && d.date < '2022-04-01'));
    const file = folder.write('weather-no-march.csv', weatherCsv(gappy));
    const run = await runCli(['fit', '--readings', readingsFile, '--weather', file]);
    expect(run.code).toBe(0);
    expect(run.stdout).toContain('(23 periods used, 1 left out)');
    expect(run.stdout).toMatch(/row 4 {2}2022-03-01 to 2022-04-01: weather covers 0 of 31 days/); // the engine's reason text
  });
});

describe('weather files', () => {
  it('reads date,tmin,tmax as the mean of the two (common practice)', async () => {
    // Synthetic: the test sets tmin and tmax 8 °F either side of the mean.
    const minMax = ['date,tmin,tmax', ...weather.map((d) => `${d.date},${d.temp - 8},${d.temp + 8}`)].join('\n');
    const file = folder.write('weather-min-max.csv', minMax);
    const run = await runCli(['fit', '--readings', readingsFile, '--weather', file, '--json']);
    expect(run.code).toBe(0);
    const means = weather.map((d) => ({ date: d.date, temp: (d.temp - 8 + (d.temp + 8)) / 2 }));
    expect(JSON.parse(run.stdout)).toEqual(asJson(analyseBaseline(baseline, means).document)); // source: the engine itself
  });

  it('fits °C weather with --unit C, the changepoints mapping as the temperatures do', async () => {
    const celsius = weather.map((d) => ({ date: d.date, temp: fahrenheitToCelsius(d.temp) }));
    const file = folder.write('weather-celsius.csv', weatherCsv(celsius));
    const run = await runCli(['fit', '--readings', readingsFile, '--weather', file, '--unit', 'C', '--json']);
    expect(run.code).toBe(0);
    const inCelsius = JSON.parse(run.stdout) as {
      selected: string;
      candidates: { model: string; parameters: Record<string, number> }[];
    };
    const inFahrenheit = analyseBaseline(baseline, weather).document; // source: the engine itself
    expect(inCelsius.selected).toBe(inFahrenheit.selected);
    // Hand-worked: an affine change of x moves the least-squares changepoints the same way.
    const cp = (doc: typeof inCelsius, name: string) =>
      doc.candidates.find((c) => c.model === inFahrenheit.selected)!.parameters[name]!;
    const changepointNames = Object.keys(
      inFahrenheit.candidates.find((c) => c.model === inFahrenheit.selected)!.parameters,
    ).filter((n) => /changepoint/i.test(n));
    expect(changepointNames.length).toBeGreaterThan(0); // synthetic: the data have a changepoint shape
    for (const name of changepointNames) {
      expect(cp(inCelsius, name)).toBeCloseTo(fahrenheitToCelsius(cp(inFahrenheit as typeof inCelsius, name)), 6);
    }
  });

  it('refuses °C temperatures above the plausible range under --unit C', async () => {
    // Synthetic: 65 °C is 149 °F, above the engine's 140 °F bound.
    const file = folder.write('weather-too-hot.csv', 'date,temp\n2022-01-01,10\n2022-01-02,65\n');
    const run = await runCli(['fit', '--readings', readingsFile, '--weather', file, '--unit', 'C']);
    expect(run.code).toBe(2);
    expect(run.stdout).toBe('');
    expect(run.stderr).toMatch(/weather-too-hot\.csv row 3, field "temp": 65 °C is outside/);
  });

  it('treats an empty temperature cell as a missing day', async () => {
    // Synthetic: blanking one day leaves every month above the 90% coverage threshold.
    const gappy = weather.map((d, k) => (k === 40 ? `${d.date},` : `${d.date},${d.temp}`));
    const file = folder.write('weather-gap.csv', ['date,temp', ...gappy].join('\n'));
    const run = await runCli(['fit', '--readings', readingsFile, '--weather', file, '--json']);
    expect(run.code).toBe(0);
    const expected = analyseBaseline(
      baseline,
      weather.filter((_, k) => k !== 40),
    ).document; // source: the engine itself
    expect(JSON.parse(run.stdout)).toEqual(asJson(expected));
  });
});

describe('the committed examples', () => {
  it('choose a shape with both a heating and a cooling branch', async () => {
    const example = (name: string) => fileURLToPath(new URL(`../../examples/${name}`, import.meta.url));
    const run = await runCli([
      'fit',
      '--readings',
      example('baseline.csv'),
      '--weather',
      example('weather.csv'),
      '--json',
    ]);
    expect(run.code).toBe(0);
    // Synthetic: examples/make-examples.ts builds use with heating below 55 °F and cooling above 67 °F.
    expect(['4P', '5P']).toContain((JSON.parse(run.stdout) as { selected: string }).selected);
  });
});

describe('mvledger fit with a weather file that marks filled days', () => {
  // Synthetic: the weather file's `filled` column marks three January days as interpolated, one in March from a second station.
  const marks = new Map([
    ['2022-01-10', 'interpolation'],
    ['2022-01-11', 'interpolation'],
    ['2022-01-12', 'interpolation'],
    ['2022-03-05', 'second-station'],
  ]);
  const filledFile = folder.write(
    'weather-filled.csv',
    ['date,temp,filled', ...weather.map((d) => `${d.date},${d.temp},${marks.get(d.date) ?? ''}`)].join('\n') + '\n',
  );

  it('prints each period with filled days and its filled column; the fit is the same', async () => {
    const run = await runCli(['fit', '--readings', readingsFile, '--weather', filledFile]);
    expect(run.code).toBe(0);
    const section = run.stdout.slice(run.stdout.indexOf('Periods whose weather was filled on record'));
    const rows = section.split('\n').slice(1, 5);
    expect(rows[0]).toMatch(/Period\s+Days\s+Filled/);
    expect(section).toMatch(/2022-01-01 to 2022-02-01\s+31\s+3 of 31 days filled by interpolation/); // synthetic: the marks above
    expect(section).toMatch(/2022-03-01 to 2022-04-01\s+31\s+1 of 31 days filled from a second station/);
    const plain = await runCli(['fit', '--readings', readingsFile, '--weather', weatherFile, '--json']);
    const marked = await runCli(['fit', '--readings', readingsFile, '--weather', filledFile, '--json']);
    expect(marked.stdout).toBe(plain.stdout); // the marks say where the weather came from; they do not change it
  });

  it('refuses an unknown fill method naming its row', async () => {
    const bad = folder.write('weather-bad-fill.csv', `date,temp,filled\n2022-01-01,30,guessed\n`);
    const run = await runCli(['fit', '--readings', readingsFile, '--weather', bad]);
    expect(run.code).toBe(2);
    expect(run.stderr).toMatch(
      /row 2, field "filled": must be empty, interpolation or second-station, got "guessed"\n$/,
    );
  });
});
