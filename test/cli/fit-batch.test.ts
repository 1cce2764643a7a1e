/**
 * `mvledger fit --batch`: every meter of one readings file, one row or JSON
 * line per meter, each equal to what `mvledger fit --json` gives for that
 * meter alone (the reference: the single-meter command on the same rows).
 * Synthetic: the test builds the meters (scaled copies of one invented
 * building) and plants the faults, so it sets every expected value.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { makeTempFolder, readingsCsv, runCli, syntheticBills, syntheticWeather, weatherCsv } from './helpers.js';

const folder = makeTempFolder();
afterAll(() => folder.remove());

const weather = syntheticWeather();
const meters = [
  { id: 'north-wing', factor: 1, station: 'hill' },
  { id: 'south-wing', factor: 1.7, station: 'valley' },
  { id: 'annex', factor: 0.4, station: 'hill' },
];
const billsOf = (factor: number) => syntheticBills(weather, 2022, 24, factor);
const body = (factor: number) => readingsCsv(billsOf(factor)).trimEnd().split('\n').slice(1);
const batchRows = meters.flatMap((m) => body(m.factor).map((line) => `${m.id},${m.station},${line}`));
const header = `meter,station,${readingsCsv(billsOf(1)).split('\n')[0]}`;
const batchFile = folder.write('batch.csv', [header, ...batchRows].join('\n'));
const noStationFile = folder.write(
  'batch-no-station.csv',
  [
    `meter,${readingsCsv(billsOf(1)).split('\n')[0]}`,
    ...meters.flatMap((m) => body(m.factor).map((line) => `${m.id},${line}`)),
  ].join('\n'),
);
const weatherLines = weatherCsv(weather).trimEnd().split('\n');
const oneWeather = folder.write('weather.csv', weatherLines.join('\n'));
// The same days under two station names: each meter must find its own.
const stationWeather = folder.write(
  'weather-stations.csv',
  [
    `station,${weatherLines[0]}`,
    ...['hill', 'valley'].flatMap((s) => weatherLines.slice(1).map((l) => `${s},${l}`)),
  ].join('\n'),
);

async function singleFit(factor: number) {
  const file = folder.write(`single-${factor}.csv`, readingsCsv(billsOf(factor)));
  const run = await runCli(['fit', '--json', '--readings', file, '--weather', oneWeather]);
  expect(run.code).toBe(0);
  return JSON.parse(run.stdout) as {
    selected: string;
    candidates: { model: string; parameters: Record<string, number> }[];
  };
}

describe('mvledger fit --batch', () => {
  it('writes one JSON line per meter, each the single-meter fit (stations from the weather file)', async () => {
    const run = await runCli(['fit', '--batch', '--json', '--readings', batchFile, '--weather', stationWeather]);
    expect(run.code).toBe(0);
    const lines = run.stdout
      .trimEnd()
      .split('\n')
      .map((l) => JSON.parse(l) as { meter: string; station: string; status: string; fit: unknown });
    expect(lines.map((l) => [l.meter, l.station, l.status])).toEqual(meters.map((m) => [m.id, m.station, 'ok']));
    for (const [k, meter] of meters.entries()) expect(lines[k]!.fit).toEqual(await singleFit(meter.factor));
    expect(run.stderr).toBe('mvledger: fitted 3 of 3 meter(s)\n');
  });

  it('writes a CSV header and one row per meter with the selected shape and its parameters', async () => {
    const run = await runCli(['fit', '--batch', '--readings', noStationFile, '--weather', oneWeather]);
    expect(run.code).toBe(0);
    const rows = run.stdout.trimEnd().split('\r\n');
    expect(rows[0]).toBe(
      'meter,station,status,model,temperature_form,periods_used,periods_excluded,r2,cvrmse,nmbe,guideline14,parameters,error',
    );
    expect(rows).toHaveLength(4);
    for (const [k, meter] of meters.entries()) {
      const single = await singleFit(meter.factor);
      const cells = rows[k + 1]!.split(',');
      expect(cells.slice(0, 5)).toEqual([meter.id, '', 'ok', single.selected, 'daily']);
      const parameters = Object.fromEntries(cells[11]!.split(';').map((p) => p.split('=') as [string, string]));
      const expected = single.candidates.find((c) => c.model === single.selected)!.parameters;
      for (const [name, value] of Object.entries(expected)) expect(Number(parameters[name])).toBeCloseTo(value, 5);
    }
  });

  it('a meter with a bad row gets an error row naming the row and field; the others are fitted; exit code 2', async () => {
    const bad = batchRows.map((line, k) => (k === 30 ? line.replace(/,(\d+)(,|$)/, ',lots$2') : line));
    const file = folder.write('batch-bad.csv', [header, ...bad].join('\n'));
    const run = await runCli(['fit', '--batch', '--json', '--readings', file, '--weather', stationWeather]);
    expect(run.code).toBe(2);
    const lines = run.stdout
      .trimEnd()
      .split('\n')
      .map((l) => JSON.parse(l) as { meter: string; status: string; error?: string });
    expect(lines.map((l) => l.status)).toEqual(['ok', 'error', 'ok']);
    // Row 32 of the file: header is row 1, the bad body row is index 30.
    expect(lines[1]!.error).toMatch(/batch-bad\.csv row 32, field "quantity": not a number/);
    expect(run.stderr).toMatch(/fitted 2 of 3 meter\(s\); 1 failed/);
  });

  it('a station with no weather stops the batch before any output', async () => {
    const file = folder.write(
      'batch-lost.csv',
      [header, ...batchRows.map((l) => l.replace(',valley,', ',coast,'))].join('\n'),
    );
    const run = await runCli(['fit', '--batch', '--readings', file, '--weather', stationWeather]);
    expect(run.code).toBe(2);
    expect(run.stdout).toBe('');
    expect(run.stderr).toMatch(/field "station": no weather for station "coast" \(meter "south-wing"\)/);
  });

  it('a meter read on two stations and a file without a meter column are refused before any output', async () => {
    const twoStations = folder.write(
      'batch-two.csv',
      [header, ...batchRows.map((l, k) => (k === 3 ? l.replace(',hill,', ',valley,') : l))].join('\n'),
    );
    const run = await runCli(['fit', '--batch', '--readings', twoStations, '--weather', stationWeather]);
    expect(run.code).toBe(2);
    expect(run.stdout).toBe('');
    expect(run.stderr).toMatch(
      /row 5, field "station": meter "north-wing" is read on station "hill" \(row 2\), here "valley"/,
    );
    const noMeter = folder.write('batch-nometer.csv', readingsCsv(billsOf(1)));
    const second = await runCli(['fit', '--batch', '--readings', noMeter, '--weather', oneWeather]);
    expect(second.code).toBe(2);
    expect(second.stderr).toMatch(/field "meter": missing column "meter"/);
  });
});

describe('fit --batch on worker threads', () => {
  it('writes the same bytes on three threads as on one (lines in the file’s order)', async () => {
    const { runFitBatch } = await import('../../src/cli/commands/fit-batch.js');
    const { parseFitOptions } = await import('../../src/cli/options.js');
    const options = parseFitOptions(['--batch', '--readings', batchFile, '--weather', stationWeather]);
    if (options.help) throw new Error('unexpected help');
    const capture = () => {
      const out = { stdout: '', stderr: '' };
      return {
        out,
        io: { stdout: (t: string) => void (out.stdout += t), stderr: (t: string) => void (out.stderr += t) },
      };
    };
    const one = capture();
    const three = capture();
    expect(await runFitBatch(options, one.io, 1)).toEqual({ fitted: 3, failed: 0 });
    expect(await runFitBatch(options, three.io, 3)).toEqual({ fitted: 3, failed: 0 });
    expect(three.out.stdout).toBe(one.out.stdout);
    expect(three.out.stderr).toBe(one.out.stderr);
  });
});
