/**
 * NOAA daily normals CSV (src/station-archives/daily-normals-csv.ts) on files
 * constructed to the published layout (fixtures.ts: both the access form of
 * the sample file and the by-station archive form of the readme; invented
 * station, invented values). Check values: synthetic (the fixture sets each
 * day's value), °F → °C by NIST SP 811 (t/°C = (t/°F − 32)/1.8), hand-worked
 * means of TMAX and TMIN.
 */
import { describe, expect, it } from 'vitest';
import { ArchiveFormatError, readDailyNormalsCsv } from '../../src/station-archives/index.js';
import { NORMALS_ID, normalsAccessCsv, normalsArchiveCsv, normalsDays, normalsValues } from './fixtures.js';

function formatError(run: () => unknown): ArchiveFormatError {
  try {
    run();
  } catch (error) {
    if (error instanceof ArchiveFormatError) return error;
    throw error;
  }
  throw new Error('expected an ArchiveFormatError');
}

const F = { unit: 'F' } as const;
/** Line of a day in a constructed file: the header is line 1, then one row per day of the leap year. */
const lineOf = (day: string) => normalsDays().indexOf(day) + 2;

describe('NOAA daily normals CSV', () => {
  it('reads the access form into 365 days, 02-29 left out, each day its DLY-TAVG-NORMAL', () => {
    const year = readDailyNormalsCsv(normalsAccessCsv(), F);
    expect(year.archiveStationId).toBe(NORMALS_ID);
    expect(year.days).toHaveLength(365);
    expect(year.days.some((d) => d.day === '02-29')).toBe(false);
    expect(year.hadFebruary29).toBe(true);
    expect([year.fromAverage, year.fromMaxMin]).toEqual([365, 0]);
    const days = normalsDays();
    for (const { day, temp } of year.days) expect(temp).toBe(Number(normalsValues(days.indexOf(day)).tavg)); // synthetic: the fixture's value
    expect(year.days[59]).toEqual({ day: '03-01', temp: Number(normalsValues(60).tavg) }); // 1 March follows 28 February
  });

  it('reads the by-station archive form (month and day columns, four columns per quantity) alike', () => {
    expect(readDailyNormalsCsv(normalsArchiveCsv(), F).days).toEqual(readDailyNormalsCsv(normalsAccessCsv(), F).days);
  });

  it('reads a file without a 02-29 row the same', () => {
    const without = readDailyNormalsCsv(normalsAccessCsv({ days: normalsDays().filter((d) => d !== '02-29') }), F);
    expect(without.hadFebruary29).toBe(false);
    expect(without.days).toEqual(readDailyNormalsCsv(normalsAccessCsv(), F).days);
  });

  it('converts °F once to a °C station (NIST SP 811)', () => {
    const file = normalsAccessCsv({
      change: (day, cells) => day === '01-01' && (cells['DLY-TAVG-NORMAL'] = '    50.0'),
    });
    const year = readDailyNormalsCsv(file, { unit: 'C' });
    expect(year.days[0]).toEqual({ day: '01-01', temp: 10 }); // (50 − 32)/1.8 = 10 exactly
    expect(year.days[1]!.temp).toBeCloseTo((Number(normalsValues(1).tavg) - 32) / 1.8, 6);
  });

  it('takes (TMAX + TMIN)/2 where TAVG carries the missing marker −9999, is empty, or is flagged M', () => {
    const file = normalsArchiveCsv({
      change: (day, cells) => {
        if (day === '01-05') cells['DLY-TAVG-NORMAL'] = ' -9999.0';
        if (day === '01-06') cells['DLY-TAVG-NORMAL'] = '';
        if (day === '01-07') cells['meas_flag_DLY-TAVG-NORMAL'] = 'M';
        if (day === '01-07') Object.assign(cells, { 'DLY-TMAX-NORMAL': '41.0', 'DLY-TMIN-NORMAL': '30.0' });
      },
    });
    const year = readDailyNormalsCsv(file, F);
    expect([year.fromAverage, year.fromMaxMin]).toEqual([362, 3]);
    expect(year.days[4]!.temp).toBeCloseTo(Number(normalsValues(4).tavg), 9); // (tavg + 9.5 + tavg − 9.5)/2 = tavg: hand-worked
    expect(year.days[6]!.temp).toBe(35.5); // (41.0 + 30.0)/2: hand-worked
  });

  it('keeps a value flagged X (a nonzero value rounded to zero) as a value', () => {
    const file = normalsArchiveCsv({
      change: (day, cells) =>
        day === '01-10' && Object.assign(cells, { 'DLY-TAVG-NORMAL': '0.0', 'meas_flag_DLY-TAVG-NORMAL': 'X' }),
    });
    expect(readDailyNormalsCsv(file, F).days[9]).toEqual({ day: '01-10', temp: 0 });
  });

  describe('refuses bad input with one error naming the line and column', () => {
    it('a day with no usable normal at all', () => {
      const file = normalsAccessCsv({
        change: (day, cells) =>
          day === '03-03' && Object.assign(cells, { 'DLY-TAVG-NORMAL': ' -9999.0', 'DLY-TMAX-NORMAL': ' -9999.0' }),
      });
      const error = formatError(() => readDailyNormalsCsv(file, F));
      expect(error.message).toBe(
        `line ${lineOf('03-03')}, column 8 (DLY-TAVG-NORMAL): day 03-03 has no usable daily normal: DLY-TAVG-NORMAL is missing and no DLY-TMAX-NORMAL/DLY-TMIN-NORMAL pair stands in for it`,
      );
    });

    it('a value that is not a number', () => {
      const file = normalsAccessCsv({
        change: (day, cells) => day === '07-04' && (cells['DLY-TMAX-NORMAL'] = '  8x.1'),
      });
      expect(formatError(() => readDailyNormalsCsv(file, F)).message).toBe(
        `line ${lineOf('07-04')}, column 9 (DLY-TMAX-NORMAL): must be a number, got "8x.1"`,
      );
    });

    it('a truncated row', () => {
      const lines = normalsAccessCsv().split('\n');
      // Eight comma-separated pieces: seven fields, the quoted NAME holding a comma of its own.
      lines[10] = lines[10]!.split(',').slice(0, 8).join(',');
      expect(formatError(() => readDailyNormalsCsv(lines.join('\n'), F)).message).toBe(
        'line 11, column 8: truncated row: 7 fields, the header has 13',
      );
    });

    it('a day missing from the year, and a day given twice', () => {
      const short = normalsAccessCsv({ days: normalsDays().filter((d) => d !== '06-15') });
      expect(formatError(() => readDailyNormalsCsv(short, F)).message).toBe(
        'line 366: the file ends without 1 calendar day(s) of the year: 06-15',
      );
      const twice = normalsAccessCsv({ days: [...normalsDays(), '12-31'] });
      expect(formatError(() => readDailyNormalsCsv(twice, F)).message).toBe(
        `line 368, column 6 (DATE): day 12-31 repeats line ${lineOf('12-31')}`,
      );
    });

    it('a day that is not in the calendar, and a monthly row (day 99)', () => {
      const impossible = normalsAccessCsv({ change: (day, cells) => day === '02-28' && (cells.DATE = '02-30') });
      expect(formatError(() => readDailyNormalsCsv(impossible, F)).message).toBe(
        `line ${lineOf('02-28')}, column 6 (DATE): 02-30 is not a calendar day`,
      );
      const monthly = normalsArchiveCsv({ change: (day, cells) => day === '01-01' && (cells.day = '99') });
      expect(formatError(() => readDailyNormalsCsv(monthly, F)).message).toBe(
        'line 2, column 7 (day): day 99 marks a monthly or annual row: this is not a daily normals file',
      );
    });

    it('another station than expected, or two stations in one file', () => {
      expect(
        formatError(() => readDailyNormalsCsv(normalsAccessCsv(), { unit: 'F', expectedStationId: 'ZZC00099999' }))
          .message,
      ).toBe(`line 2, column 1 (STATION): station id ${NORMALS_ID} does not match the expected station ZZC00099999`);
      const mixed = normalsAccessCsv({ change: (day, cells) => day === '05-05' && (cells.STATION = 'ZZC00011111') });
      expect(formatError(() => readDailyNormalsCsv(mixed, F)).message).toMatch(
        new RegExp(
          `^line ${lineOf('05-05')}, column 1 \\(STATION\\): station id ZZC00011111 differs from ${NORMALS_ID}`,
        ),
      );
    });

    it('a file in another format (a .dly line, a monthly normals header)', () => {
      const dly = `ZZX00012345202402TMAX  100  S  100  S\n`;
      expect(formatError(() => readDailyNormalsCsv(dly, F)).message).toMatch(
        /^line 1: the header lacks STATION \(or GHCN_ID\), DATE \(or month and day\)/,
      );
      const monthly = 'STATION,month,day,hour,MLY-TAVG-NORMAL\nZZC00054321,01,99,99,31.6\n';
      expect(formatError(() => readDailyNormalsCsv(monthly, F)).message).toMatch(
        /^line 1: the header lacks DLY-TAVG-NORMAL \(or DLY-TMAX-NORMAL and DLY-TMIN-NORMAL\)/,
      );
    });

    it('a header and nothing else', () => {
      expect(formatError(() => readDailyNormalsCsv('"STATION","DATE","DLY-TAVG-NORMAL"\n', F)).message).toBe(
        'line 2: the file holds a header and no daily row',
      );
    });
  });
});
