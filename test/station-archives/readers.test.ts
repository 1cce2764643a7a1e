import { describe, expect, it } from 'vitest';
import { ArchiveFormatError, readStationArchive, type ArchiveImport } from '../../src/station-archives/index.js';
import { dlyLine, GHCN_ID, GSOD_HEADER, GSOD_ID, gsodRow, repeat, type Slot } from './fixtures.js';

function formatError(run: () => unknown): ArchiveFormatError {
  try {
    run();
  } catch (error) {
    if (error instanceof ArchiveFormatError) return error;
    throw error;
  }
  throw new Error('expected an ArchiveFormatError');
}

function byDate(result: ArchiveImport) {
  return new Map(result.days.map((d) => [d.date, d]));
}

describe('GHCN-Daily .dly', () => {
  // February 2024 (a leap year: 29 days) and April 2023 (30 days); invented values in tenths of °C.
  const feb: Slot[] = [...repeat(100, 28), [120, ' ', ' ', 'S']]; // 29 February present
  const febMin: Slot[] = [...repeat(-20, 28), [0, ' ', ' ', 'S']];
  febMin[4] = [-9999]; // 5 Feb: TMIN missing
  febMin[5] = [-35, ' ', 'I', 'S']; // 6 Feb: TMIN failed the internal consistency check
  const febAvg: Slot[] = [];
  febAvg[4] = [41, 'H', ' ', 'S']; // 5 Feb: TAVG present (M-flag H: average of hourly values; kept)
  const aprMax: Slot[] = repeat(256, 30);
  aprMax[9] = [256, ' ', 'O', 'S']; // 10 Apr: failed the outlier check
  const aprMin: Slot[] = repeat(-10, 30);
  const file = [
    dlyLine(GHCN_ID, 2024, 2, 'TMAX', feb),
    dlyLine(GHCN_ID, 2024, 2, 'TMIN', febMin),
    dlyLine(GHCN_ID, 2024, 2, 'TAVG', febAvg),
    dlyLine(GHCN_ID, 2024, 2, 'PRCP', repeat(3, 29)),
    dlyLine(GHCN_ID, 2023, 4, 'TMAX', aprMax),
    dlyLine(GHCN_ID, 2023, 4, 'TMIN', aprMin),
  ].join('\n');

  it('lays a line out as the readme says (269 characters, VALUE1 at 22–26, VALUE31 at 262–266)', () => {
    const line = dlyLine(GHCN_ID, 2024, 2, 'TMAX', feb);
    expect(line).toHaveLength(269);
    expect(line.slice(21, 26)).toBe('  100');
    expect(line.slice(261, 266)).toBe('-9999');
  });

  it('reads °C tenths into °C, pairs TMIN/TMAX, falls back to TAVG, drops flagged values and counts everything', () => {
    const result = readStationArchive('ghcn-dly', file, { unit: 'C', expectedStationId: GHCN_ID });
    expect(result.archiveStationId).toBe(GHCN_ID);
    const days = byDate(result);
    expect(days.get('2024-02-01')).toMatchObject({ tmin: -2, tmax: 10, line: 1 });
    expect(days.get('2024-02-29')).toMatchObject({ tmin: 0, tmax: 12 }); // the leap day is read
    expect(days.get('2024-02-05')).toMatchObject({ temp: 4.1 }); // TMIN missing: TAVG
    expect(days.has('2024-02-06')).toBe(false); // TMIN refused (I), no TAVG: missing
    expect(days.has('2023-04-10')).toBe(false); // TMAX refused (O): missing
    expect(days.has('2023-04-31')).toBe(false); // April has 30 days
    // Days read: 29 (February 2024) + 30 (April 2023); two refused values; two days without a usable temperature.
    expect(result.counts).toEqual({
      daysRead: 59,
      imported: 57,
      droppedByFlag: 2,
      missing: 2,
      droppedFlags: { I: 1, O: 1 },
      otherElements: 1,
    });
    expect(result.days.map((d) => d.date)).toEqual([...result.days.map((d) => d.date)].sort());
  });

  it('converts to °F once (NIST SP 811: t/°F = 1.8·t/°C + 32)', () => {
    const days = byDate(readStationArchive('ghcn-dly', file, { unit: 'F' }));
    // 25.6 °C → 78.08 °F; −1.0 °C → 30.2 °F; 4.1 °C → 39.38 °F (NIST SP 811, exact relation)
    expect(days.get('2023-04-01')!.tmax).toBeCloseTo(78.08, 10);
    expect(days.get('2023-04-01')!.tmin).toBeCloseTo(30.2, 10);
    expect(days.get('2024-02-05')!.temp).toBeCloseTo(39.38, 10);
    // 0 °C → 32 °F (NIST SP 811)
    expect(days.get('2024-02-29')!.tmin).toBe(32);
  });

  it('refuses a truncated line, naming line and column', () => {
    const lines = file.split('\n');
    lines[2] = lines[2]!.slice(0, 150);
    const error = formatError(() => readStationArchive('ghcn-dly', lines.join('\n'), { unit: 'C' }));
    expect(error.line).toBe(3);
    expect(error.column).toBe(151);
    expect(error.message).toMatch(/^line 3, column 151: truncated line/);
  });

  it('refuses an unknown element', () => {
    const text = dlyLine(GHCN_ID, 2024, 2, 'TMXX', feb);
    const error = formatError(() => readStationArchive('ghcn-dly', text, { unit: 'C' }));
    expect([error.line, error.column]).toEqual([1, 18]);
    expect(error.detail).toMatch(/unknown element "TMXX"/);
  });

  it('refuses a station id that does not match, and a second station in one file', () => {
    const wrong = formatError(() =>
      readStationArchive('ghcn-dly', file, { unit: 'C', expectedStationId: 'ZZX00099999' }),
    );
    expect([wrong.line, wrong.column]).toEqual([1, 1]);
    expect(wrong.detail).toMatch(/does not match the expected station ZZX00099999/);
    const mixed = `${file}\n${dlyLine('ZZX00099999', 2023, 5, 'TMAX', repeat(1, 31))}`;
    expect(formatError(() => readStationArchive('ghcn-dly', mixed, { unit: 'C' })).line).toBe(7);
  });

  it('refuses a value on a day the month does not have, a non-integer value and a repeated line', () => {
    const bad: Slot[] = repeat(10, 31); // 31 values in April
    const e1 = formatError(() => readStationArchive('ghcn-dly', dlyLine(GHCN_ID, 2023, 4, 'TMAX', bad), { unit: 'C' }));
    expect([e1.line, e1.column]).toEqual([1, 22 + 8 * 30]);
    const line = dlyLine(GHCN_ID, 2023, 4, 'TMAX', repeat(10, 30));
    const e2 = formatError(() =>
      readStationArchive('ghcn-dly', `${line.slice(0, 29)}  1x0${line.slice(34)}`, { unit: 'C' }),
    );
    expect([e2.line, e2.column]).toEqual([1, 30]);
    const e3 = formatError(() => readStationArchive('ghcn-dly', `${line}\n${line}`, { unit: 'C' }));
    expect(e3.detail).toMatch(/repeats line 1/);
  });

  it('refuses a file in another format with a clear message', () => {
    const csv = `${GHCN_ID},20240101,TMAX,100,,,S,`;
    expect(formatError(() => readStationArchive('ghcn-dly', csv, { unit: 'C' })).detail).toMatch(
      /looks like a CSV file/,
    );
  });
});

describe('GHCN-Daily by-station CSV', () => {
  const file = [
    `${GHCN_ID},20240228,TMAX,100,,,S,`,
    `${GHCN_ID},20240228,TMIN,-20,,,S,`,
    `${GHCN_ID},20240228,PRCP,5,,,S,0700`,
    `${GHCN_ID},20240229,TMAX,120,,,S,`,
    `${GHCN_ID},20240229,TMIN,-35,,I,S,`,
    `${GHCN_ID},20240301,TAVG,55,H,,S,`,
    `${GHCN_ID},20240302,TMAX,-9999,,,S,`,
  ].join('\n');

  it('reads the same fields as the .dly form, one element-day a line', () => {
    const result = readStationArchive('ghcn-csv', file, { unit: 'C', expectedStationId: GHCN_ID });
    const days = byDate(result);
    expect(days.get('2024-02-28')).toMatchObject({ tmin: -2, tmax: 10, line: 1 });
    expect(days.has('2024-02-29')).toBe(false);
    expect(days.get('2024-03-01')).toMatchObject({ temp: 5.5 });
    expect(result.counts).toEqual({
      daysRead: 4,
      imported: 2,
      droppedByFlag: 1,
      missing: 2,
      droppedFlags: { I: 1 },
      otherElements: 1,
    });
  });

  it('names line and field of a bad value, an unknown element and a wrong station', () => {
    const e1 = formatError(() => readStationArchive('ghcn-csv', `${GHCN_ID},20240230,TMAX,1,,,S,`, { unit: 'C' }));
    expect(e1.message).toBe('line 1, column 2 (YEAR/MONTH/DAY): must be a real date as YYYYMMDD, got "20240230"');
    const e2 = formatError(() =>
      readStationArchive('ghcn-csv', `${file}\n${GHCN_ID},20240303,XTMP,1,,,S,`, { unit: 'C' }),
    );
    expect(e2.place).toBe('line 8, column 3 (ELEMENT)');
    const e3 = formatError(() => readStationArchive('ghcn-csv', file, { unit: 'C', expectedStationId: 'ZZX00000001' }));
    expect(e3.place).toBe('line 1, column 1 (ID)');
    const e4 = formatError(() => readStationArchive('ghcn-csv', `${GSOD_HEADER}\n`, { unit: 'C' }));
    expect(e4.detail).toMatch(/gsod-csv/);
  });
});

describe('GSOD CSV', () => {
  const file = [
    GSOD_HEADER,
    gsodRow(GSOD_ID, '2024-02-28', '  50.0', '24', '  59.0', ' ', '  41.0', '*'),
    gsodRow(GSOD_ID, '2024-02-29', '  32.0', ' 8', '  40.1', '*', '  25.3', ' '),
    gsodRow(GSOD_ID, '2024-03-01', '9999.9', ' 0', '  68.0', ' ', '  50.0', ' '),
    gsodRow(GSOD_ID, '2024-03-02', '9999.9', ' 0', '9999.9', ' ', '  50.0', ' '),
  ].join('\n');

  it('takes TEMP as the mean, (MAX + MIN)/2 where TEMP is missing, and converts °F to °C once (NIST SP 811)', () => {
    const result = readStationArchive('gsod-csv', file, { unit: 'C', expectedStationId: '999999-12345' });
    const days = byDate(result);
    expect(days.get('2024-02-28')!.temp).toBeCloseTo(10, 12); // 50 °F = 10 °C (NIST SP 811)
    expect(days.get('2024-02-29')!.temp).toBe(0); // 32 °F = 0 °C
    expect(days.get('2024-03-01')).toMatchObject({ tmin: 10, tmax: 20 }); // 50 °F, 68 °F
    expect(days.has('2024-03-02')).toBe(false);
    expect(result.counts).toEqual({
      daysRead: 4,
      imported: 3,
      droppedByFlag: 0,
      missing: 1,
      droppedFlags: {},
      otherElements: 0,
    });
    expect(byDate(readStationArchive('gsod-csv', file, { unit: 'F' })).get('2024-02-28')!.temp).toBe(50);
  });

  it('names line and column of a bad cell, a truncated row and a wrong station; refuses another format', () => {
    const bad = file.replace('"  32.0"', '"3x.0"');
    expect(formatError(() => readStationArchive('gsod-csv', bad, { unit: 'F' })).place).toBe('line 3, column 7 (TEMP)');
    const cut = `${file}\n"${GSOD_ID}","2024-03-03","10.0"`;
    expect(formatError(() => readStationArchive('gsod-csv', cut, { unit: 'F' })).place).toBe('line 6, column 4');
    const other = formatError(() =>
      readStationArchive('gsod-csv', file, { unit: 'F', expectedStationId: '99999954321' }),
    );
    expect(other.place).toBe('line 2, column 1 (STATION)');
    const dly = formatError(() => readStationArchive('gsod-csv', `${GHCN_ID}202402TMAX  100  S`, { unit: 'F' }));
    expect(dly.detail).toMatch(/the header lacks/);
  });
});

describe('size', () => {
  it('refuses a 50 MB file before reading it', () => {
    const error = formatError(() => readStationArchive('ghcn-dly', 'x'.repeat(50 * 1000 * 1000), { unit: 'C' }));
    expect(error.detail).toMatch(/largest accepted is 16777216/);
  });
});
