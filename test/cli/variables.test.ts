/**
 * `--variables FILE` and `--exclusions FILE` on the command line. Check
 * values: the engine itself called on the same records; the error wording
 * is the CLI's own contract (file, row, field). Synthetic data: the test
 * sets the truth (bills raised by 0.5 kWh per unit produced).
 */
import { afterAll, describe, expect, it } from 'vitest';
import { analyseBaseline, type VariableSeries } from '../../src/engine/index.js';
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
const bills = syntheticBills(weather, 2022, 24);
const units = bills.map((_, i) => 2000 + 1500 * Math.sin(i * 1.3));
const baseline = bills.map((b, i) => ({ ...b, quantity: b.quantity + 0.5 * units[i]! }));
const readingsFile = folder.write('baseline.csv', readingsCsv(baseline));
const weatherFile = folder.write('weather.csv', weatherCsv(weather));
const variablesCsv =
  ['start,end,units:total', ...baseline.map((b, i) => `${b.start},${b.end},${units[i]}`)].join('\n') + '\n';
const variablesFile = folder.write('variables.csv', variablesCsv);

describe('mvledger fit --variables', () => {
  it('offers each column to the fit, as the engine does', async () => {
    const run = await runCli([
      'fit',
      '--readings',
      readingsFile,
      '--weather',
      weatherFile,
      '--variables',
      variablesFile,
      '--json',
    ]);
    expect(run.stderr).toBe('');
    expect(run.code).toBe(0);
    const series: VariableSeries = {
      name: 'units',
      aggregation: 'total',
      values: baseline.map((b, i) => ({ start: b.start, end: b.end, value: units[i]! })),
    };
    const printed = JSON.parse(run.stdout);
    expect(printed).toEqual(
      asJson(analyseBaseline(baseline, weather, { variableSeries: [series], variables: ['units'] }).document),
    ); // the engine itself
    expect(printed.variables).toEqual(['units']);
  });

  it('names the file, row and field of a bad cell, and the periods without values', async () => {
    const bad = folder.write('bad.csv', variablesCsv.replace(/\n(\S+?,\S+?),[^,\n]+\n/, '\n$1,lots\n'));
    const run = await runCli(['fit', '--readings', readingsFile, '--weather', weatherFile, '--variables', bad]);
    expect(run.code).toBe(2);
    expect(run.stderr).toMatch(/bad\.csv row 2, field "units:total": not a number: "lots"/);
    const gap = folder.write('gap.csv', variablesCsv.replace(/\n(\S+?,\S+?),[^,\n]+\n/, '\n$1,\n'));
    const missing = await runCli(['fit', '--readings', readingsFile, '--weather', weatherFile, '--variables', gap]);
    expect(missing.code).toBe(2);
    expect(missing.stderr).toContain(`${baseline[0]!.start} to ${baseline[0]!.end} (units)`);
  });
});

describe('mvledger fit --exclusions', () => {
  it('leaves the named readings out with their reasons, and names a reading that does not exist', async () => {
    const file = folder.write(
      'exclusions.csv',
      `start,end,reason\n${baseline[4]!.start},${baseline[4]!.end},meter fault\n`,
    );
    const run = await runCli([
      'fit',
      '--readings',
      readingsFile,
      '--weather',
      weatherFile,
      '--exclusions',
      file,
      '--json',
    ]);
    expect(run.code).toBe(0);
    const printed = JSON.parse(run.stdout);
    expect(printed.exclusions).toEqual([
      { start: baseline[4]!.start, end: baseline[4]!.end, reason: 'meter fault', quantity: baseline[4]!.quantity },
    ]);
    expect(printed.periods.used).toBe(23);
    const wrong = folder.write('wrong.csv', 'start,end,reason\n2022-01-02,2022-02-01,typo\n');
    const refused = await runCli(['fit', '--readings', readingsFile, '--weather', weatherFile, '--exclusions', wrong]);
    expect(refused.code).toBe(2);
    expect(refused.stderr).toMatch(/wrong\.csv row 2, field "start": no baseline reading 2022-01-02\.\.2022-02-01/);
  });
});
