/**
 * Every kind of bad input ends the same way: exit code 2, nothing on
 * stdout, and one stderr line naming the file, the CSV row (line in the
 * file, header = 1) and the field. Synthetic: each case plants one fault in
 * otherwise good data, so the test sets the expected row and field. The
 * message patterns are the engine's wording (validate.ts) or the CLI's own
 * (src/cli/input); the plausible range -80…140 °F and the use-per-day
 * bound of 1e12 are the engine's bounds.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { makeTempFolder, readingsCsv, runCli, syntheticBills, syntheticWeather, weatherCsv } from './helpers.js';

const folder = makeTempFolder();
afterAll(() => folder.remove());

const weather = syntheticWeather();
const goodReadingLines = readingsCsv(syntheticBills(weather, 2022, 24))
  .trimEnd()
  .split('\n');
const goodWeatherLines = weatherCsv(weather).trimEnd().split('\n');
const goodReadings = folder.write('good-readings.csv', goodReadingLines.join('\n'));
const goodWeather = folder.write('good-weather.csv', goodWeatherLines.join('\n'));

/** The good lines with line `line` (1-based, header = 1) replaced. */
function withLine(lines: readonly string[], line: number, text: string): string {
  return lines.map((l, k) => (k === line - 1 ? text : l)).join('\n');
}

interface BadCase {
  name: string;
  readings?: string;
  weather?: string;
  row: number;
  field: string;
  says: RegExp;
}

const readingsCases: BadCase[] = [
  {
    name: 'a missing column',
    readings: ['start,end,amount', ...goodReadingLines.slice(1)].join('\n'),
    row: 1,
    field: 'quantity',
    says: /missing column "quantity"/,
  },
  {
    name: 'an unparseable date',
    readings: withLine(goodReadingLines, 4, '2022/03/01,2022-04-01,30000'),
    row: 4,
    field: 'start',
    says: /not a valid date/,
  },
  {
    name: 'an impossible date',
    readings: withLine(goodReadingLines, 2, '2022-01-01,2022-02-30,30000'),
    row: 2,
    field: 'end',
    says: /not a valid date .*2022-02-30/,
  },
  {
    name: 'an end not after the start',
    readings: withLine(goodReadingLines, 7, '2022-07-01,2022-06-01,30000'),
    row: 7,
    field: 'end',
    says: /end 2022-06-01 is not after start 2022-07-01/,
  },
  {
    name: 'overlapping periods',
    readings: withLine(goodReadingLines, 5, '2022-03-27,2022-05-01,30000'),
    row: 5,
    field: 'start',
    says: /overlaps the period 2022-03-01\.\.2022-04-01 \(row 4\)$/m,
  },
  {
    name: 'a duplicate period',
    readings: withLine(goodReadingLines, 6, '2022-04-01,2022-05-01,30000'),
    row: 6,
    field: 'start',
    says: /duplicates the period 2022-04-01\.\.2022-05-01 \(row 5\)$/m,
  },
  {
    name: 'a negative quantity',
    readings: withLine(goodReadingLines, 3, '2022-02-01,2022-03-01,-5'),
    row: 3,
    field: 'quantity',
    says: /negative/,
  },
  // our own bound (src/engine/bounds.ts): 1e12 a day; 28 days of 1.8e308 is far beyond it, and a bill at the bound itself is accepted elsewhere
  {
    name: 'a quantity near the largest double',
    readings: withLine(goodReadingLines, 3, '2022-02-01,2022-03-01,1.7976931348623157e308'),
    row: 3,
    field: 'quantity',
    says: /a day, beyond the bound of 1e12/,
  },
  {
    name: 'a non-numeric quantity',
    readings: withLine(goodReadingLines, 9, '2022-08-01,2022-09-01,12a'),
    row: 9,
    field: 'quantity',
    says: /not a number: "12a"/,
  },
  {
    name: 'an empty quantity',
    readings: withLine(goodReadingLines, 9, '2022-08-01,2022-09-01,'),
    row: 9,
    field: 'quantity',
    says: /empty/,
  },
  {
    name: 'a quantity with thousands separators',
    readings: withLine(goodReadingLines, 9, '2022-08-01,2022-09-01,"31,000"'),
    row: 9,
    field: 'quantity',
    says: /thousands separators/,
  },
  {
    name: 'a bad estimated flag',
    readings: [
      'start,end,quantity,estimated',
      ...goodReadingLines.slice(1).map((l, k) => `${l},${k === 10 ? 'maybe' : 'no'}`),
    ].join('\n'),
    row: 12,
    field: 'estimated',
    says: /not true\/false/,
  },
  {
    name: 'a fault after a blank line (rows are file lines)',
    readings: [
      ...goodReadingLines.slice(0, 3),
      '',
      withLine(goodReadingLines, 4, '2022-03-01,2022-04-01,-1').split('\n')[3]!,
      ...goodReadingLines.slice(4),
    ].join('\n'),
    row: 5,
    field: 'quantity',
    says: /negative/,
  },
  {
    name: 'a single reading (too few usable periods)',
    readings: goodReadingLines.slice(0, 2).join('\n'),
    row: 2,
    field: 'start',
    says: /at least 2 usable periods/,
  },
  {
    name: 'no readings at all',
    readings: goodReadingLines[0]!,
    row: 1,
    field: 'start',
    says: /no readings below the header/,
  },
  {
    name: 'readings without weather (too few usable periods)',
    readings: 'start,end,quantity\n2031-01-01,2031-02-01,100\n2031-02-01,2031-03-01,90\n2031-03-01,2031-04-01,80\n',
    row: 2,
    field: 'start',
    says: /at least 2 usable periods .*weather covers 0 of 31 days/,
  },
  {
    name: 'an unclosed quote',
    readings: withLine(goodReadingLines, 8, '2022-07-01,2022-08-01,"30000'),
    row: 8,
    field: 'quantity',
    says: /not valid CSV/,
  },
];

const weatherCases: BadCase[] = [
  {
    name: 'a missing temperature column',
    weather: ['date,temperature', ...goodWeatherLines.slice(1)].join('\n'),
    row: 1,
    field: 'temp',
    says: /missing column "temp"/,
  },
  {
    name: 'a temperature above the plausible range',
    weather: withLine(goodWeatherLines, 10, '2022-01-09,150'),
    row: 10,
    field: 'temp',
    says: /150 °F is outside the plausible range -80…140 °F/,
  },
  {
    name: 'a temperature below the plausible range',
    weather: withLine(goodWeatherLines, 11, '2022-01-10,-81'),
    row: 11,
    field: 'temp',
    says: /outside the plausible range/,
  },
  {
    name: 'a non-numeric temperature',
    weather: withLine(goodWeatherLines, 12, '2022-01-11,warm'),
    row: 12,
    field: 'temp',
    says: /not a number: "warm"/,
  },
  {
    name: 'an impossible weather date',
    weather: withLine(goodWeatherLines, 20, '2022-02-30,40'),
    row: 20,
    field: 'date',
    says: /not a valid date/,
  },
  {
    name: 'a repeated weather date',
    weather: withLine(goodWeatherLines, 3, '2022-01-01,31'),
    row: 3,
    field: 'date',
    says: /repeats the date 2022-01-01 \(row 2\)$/m,
  },
  {
    name: 'tmin above tmax',
    weather: [
      'date,TMin,TMax',
      ...weather.map((d, k) => (k === 30 ? `${d.date},60,50` : `${d.date},${d.temp - 5},${d.temp + 5}`)),
    ].join('\n'),
    row: 32,
    field: 'tmin',
    says: /tmin 60 is above tmax 50/,
  },
  {
    name: 'a missing tmax column',
    weather: ['date,tmin', ...goodWeatherLines.slice(1)].join('\n'),
    row: 1,
    field: 'tmax',
    says: /missing column "tmax"/,
  },
  {
    name: 'a tmax above the plausible range',
    weather: ['date,tmin,tmax', '2022-01-01,20,30', '2022-01-02,20,141'].join('\n'),
    row: 3,
    field: 'tmax',
    says: /141 °F is outside/,
  },
];

function expectOneLineNaming(
  run: { code: number; stdout: string; stderr: string },
  file: string,
  row: number,
  field: string,
  says: RegExp,
): void {
  expect(run.code).toBe(2);
  expect(run.stdout).toBe('');
  expect(run.stderr.endsWith('\n')).toBe(true);
  expect(run.stderr.trimEnd().split('\n')).toHaveLength(1);
  expect(run.stderr).toContain(`mvledger: ${file} row ${row}, field "${field}": `);
  expect(run.stderr).toMatch(says);
}

describe('bad readings files', () => {
  readingsCases.forEach((c, k) => {
    it(`reports ${c.name}`, async () => {
      const file = folder.write(`readings-${k}.csv`, c.readings!);
      const run = await runCli(['fit', '--readings', file, '--weather', goodWeather]);
      expectOneLineNaming(run, file, c.row, c.field, c.says);
    });
  });
});

describe('bad weather files', () => {
  weatherCases.forEach((c, k) => {
    it(`reports ${c.name}`, async () => {
      const file = folder.write(`weather-${k}.csv`, c.weather!);
      const run = await runCli(['fit', '--readings', goodReadings, '--weather', file]);
      expectOneLineNaming(run, file, c.row, c.field, c.says);
    });
  });
});

describe('other bad input', () => {
  it('reports an unreadable file by name', async () => {
    const missing = folder.path('no-such-file.csv');
    const run = await runCli(['fit', '--readings', missing, '--weather', goodWeather]);
    expect(run.code).toBe(2);
    expect(run.stdout).toBe('');
    // A file that cannot be read has no row or field to name.
    expect(run.stderr).toBe(`mvledger: ${missing}: cannot read the file (no such file)\n`);
  });

  it('reports a reporting period set with no usable period, naming the reporting file', async () => {
    const reporting = folder.write('reporting-no-weather.csv', 'start,end,quantity\n2031-01-01,2031-02-01,100\n');
    const run = await runCli([
      'savings',
      '--baseline',
      goodReadings,
      '--reporting',
      reporting,
      '--weather',
      goodWeather,
    ]);
    expectOneLineNaming(run, reporting, 2, 'start', /no reporting periods .*weather covers 0 of 31 days/);
  });

  it('reports the earliest problem and counts the rest', async () => {
    const text = withLine(
      withLine(goodReadingLines, 9, '2022-08-01,2022-09-01,-3').split('\n'),
      4,
      '2022-03-01,2022-04-01,x',
    );
    const file = folder.write('two-problems.csv', text);
    const run = await runCli(['fit', '--readings', file, '--weather', goodWeather]);
    expectOneLineNaming(run, file, 4, 'quantity', /not a number: "x" \(and 1 more problem in this file\)/);
  });
});
