import { afterAll, describe, expect, it } from 'vitest';
import { makeTempFolder, runCli } from './helpers.js';
import { makeTestApi } from '../support/api.js';
import {
  dlyLine,
  GHCN_ID,
  NORMALS_ID,
  normalsAccessCsv,
  normalsValues,
  repeat,
  type Slot,
} from '../station-archives/fixtures.js';

// A .dly file constructed to the published layout (invented id and values); check values hand-worked from it.
const folder = makeTempFolder();
afterAll(() => folder.remove());

const tmax: Slot[] = repeat(200, 30); // April 2023: 20.0 °C
const tmin: Slot[] = repeat(100, 30); // 10.0 °C
tmin[1] = [100, ' ', 'K', 'S']; // 2 April fails the streak check
tmax[2] = [-9999]; // 3 April missing
const DLY = [dlyLine(GHCN_ID, 2023, 4, 'TMAX', tmax), dlyLine(GHCN_ID, 2023, 4, 'TMIN', tmin)].join('\n');

describe('mvledger weather', () => {
  const file = folder.write('station.dly', `${DLY}\n`);

  it('import writes date,temp in the chosen unit and the counts to stderr', async () => {
    const run = await runCli(['weather', 'import', '--format', 'ghcn-dly', file, '--station', GHCN_ID, '--unit', 'F']);
    expect(run.code).toBe(0);
    const lines = run.stdout.trim().split('\n');
    expect(lines[0]).toBe('date,temp');
    // (10 + 20)/2 = 15 °C = 59 °F (NIST SP 811: 1.8·15 + 32)
    expect(lines[1]).toBe('2023-04-01,59');
    expect(lines).toHaveLength(29); // header + 28 days (2 and 3 April missing)
    expect(run.stderr).toContain(
      `station ${GHCN_ID}: 30 days read, 28 imported, 1 values dropped by quality flag (K 1), 2 days missing`,
    );
  });

  it('check prints span, missing share and extremes; bad input is one line with exit code 2', async () => {
    const check = await runCli(['weather', 'check', '--format', 'ghcn-dly', file, '--unit', 'C']);
    expect(check.code).toBe(0);
    expect(check.stdout).toContain('span 2023-04-01 .. 2023-04-30: 30 days');
    expect(check.stdout).toContain('missing 2 days (6.7%)');
    const wrong = await runCli(['weather', 'import', '--format', 'ghcn-dly', file, '--station', 'ZZX00000009']);
    expect(wrong.code).toBe(2);
    expect(wrong.stdout).toBe('');
    expect(wrong.stderr).toMatch(
      /^mvledger: .*station\.dly: line 1, column 1: station id ZZX00012345 does not match the expected station ZZX00000009\n$/,
    );
    const format = await runCli(['weather', 'import', '--format', 'dly', file]);
    expect(format.stderr).toMatch(/--format: one of ghcn-dly, ghcn-csv, gsod-csv/);
  });

  it('import --url posts the file to the service', async () => {
    const api = await makeTestApi();
    try {
      const address = await api.app.listen({ port: 0, host: '127.0.0.1' });
      const station = await api.call('POST', '/v1/weather-stations', {
        body: { name: 'Station west (invented)', temperatureUnit: 'C' },
      });
      const run = await runCli([
        'weather',
        'import',
        '--format',
        'ghcn-dly',
        file,
        '--url',
        address,
        '--station-id',
        station.json.id,
        '--key',
        api.keys.integration,
      ]);
      expect(run.code, run.stderr).toBe(0);
      expect(JSON.parse(run.stdout)).toMatchObject({
        stationId: station.json.id,
        created: 28,
        counts: { droppedByFlag: 1 },
      });
      const refused = await runCli([
        'weather',
        'import',
        '--format',
        'ghcn-dly',
        file,
        '--url',
        address,
        '--station-id',
        'wst_none',
        '--key',
        api.keys.integration,
      ]);
      expect(refused.code).toBe(2);
      expect(refused.stderr).toMatch(/the service refused the import \(404\)/);
    } finally {
      await api.close();
    }
  });
});

describe('mvledger weather normals', () => {
  // A daily normals CSV constructed to the published layout (invented station and values, fixtures.ts).
  const normals = folder.write('normals.csv', normalsAccessCsv());

  it('prints the 365-day normal year as day,temp in the chosen unit, its source on stderr', async () => {
    const run = await runCli(['weather', 'normals', normals, '--unit', 'F', '--station', NORMALS_ID]);
    expect(run.code).toBe(0);
    const lines = run.stdout.trim().split('\n');
    expect(lines[0]).toBe('day,temp');
    expect(lines).toHaveLength(366); // header + 365 days (02-29 left out)
    expect(lines[1]).toBe(`01-01,${Number(normalsValues(0).tavg)}`); // synthetic: the fixture's value
    expect(lines.some((l) => l.startsWith('02-29'))).toBe(false);
    expect(run.stderr).toContain(
      `published daily normals (noaa-daily-normals-csv) of station ${NORMALS_ID}: DLY-TAVG-NORMAL on every day`,
    );
  });

  it('refuses a faulty file in one line naming line and column, exit code 2', async () => {
    const bad = folder.write(
      'bad-normals.csv',
      normalsAccessCsv({ change: (day, cells) => day === '01-03' && (cells['DLY-TAVG-NORMAL'] = 'x') }),
    );
    const run = await runCli(['weather', 'normals', bad]);
    expect(run.code).toBe(2);
    expect(run.stdout).toBe('');
    expect(run.stderr).toMatch(
      /^mvledger: .*bad-normals\.csv: line 4, column 8 \(DLY-TAVG-NORMAL\): must be a number, got "x"\n$/,
    );
  });
});
