/**
 * NOAA's published daily climate normals in their public CSV form (the
 * 1991–2020 U.S. Climate Normals, daily, one file per station). Layout, from
 * NOAA NCEI's "Readme By-Variable By-Station Normals Files"
 * (https://www.ncei.noaa.gov/data/normals-daily/1991-2020/doc/, with
 * Normals_DLY_1991-2020_sample.csv beside it): a header row, then one row per
 * calendar day with
 *
 *   STATION (the GHCN-Daily id; GHCN_ID in the by-variable files),
 *   the day: DATE as MM-DD, or the columns month and day (day 99 = not a
 *   daily row),
 *   DLY-TAVG-NORMAL, DLY-TMAX-NORMAL, DLY-TMIN-NORMAL (the long-term means),
 *   and, in the archive files, for each quantity its measurement flag
 *   (meas_flag_<NAME>), completeness flag (comp_flag_<NAME>) and years used
 *   (years_<NAME>); among many other quantities, which are skipped.
 *
 * A value is missing when its cell is empty, holds −9999 (the sample's
 * missing marker), or its measurement flag says it could not be computed
 * (M missing, V too cold to compute, Y insufficient values, Z logically
 * inconsistent). A day's mean is DLY-TAVG-NORMAL, else (DLY-TMAX-NORMAL +
 * DLY-TMIN-NORMAL)/2. 02-29 is read and checked but is not a day of the
 * ledger's 365-day normal year (28 February and 1 March carry their own
 * normals). Values are in the file's unit (°F in the published files;
 * `fileUnit` says otherwise) and converted once to the station's.
 */
import { readArchiveCsv } from './archive-csv.js';
import { celsiusToFahrenheit, fahrenheitToCelsius, NORMAL_YEAR_DAYS, type TemperatureUnit } from '../engine/index.js';
import { ArchiveFormatError, MAX_ARCHIVE_CHARACTERS } from './types.js';

/** The published normals forms the ledger reads. */
export const NORMALS_FORMATS = ['noaa-daily-normals-csv'] as const;
export type NormalsFormat = (typeof NORMALS_FORMATS)[number];

const TAVG = 'DLY-TAVG-NORMAL';
const TMAX = 'DLY-TMAX-NORMAL';
const TMIN = 'DLY-TMIN-NORMAL';
const MISSING = -9999;
/** Measurement flags under which the value is not a usable normal (the readme's "Measurement Flags"). */
const UNUSABLE_FLAGS: Readonly<Record<string, string>> = {
  M: 'missing',
  V: 'too cold to compute',
  Y: 'insufficient values to compute',
  Z: 'logically inconsistent',
};
const DECIMAL = /^-?\d+(\.\d+)?$/;

export interface NormalsOptions {
  /** The station's unit: every value is converted once, on reading, to it. */
  unit: TemperatureUnit;
  /** The unit of the file's values (default F, as the published files are). */
  fileUnit?: TemperatureUnit;
  /** When given, every row must carry this station id. */
  expectedStationId?: string;
}

/** A published normal year as read: 365 days (MM-DD, 02-29 left out) in the station's unit, and how they were taken. */
export interface PublishedNormalYear {
  format: NormalsFormat;
  archiveStationId: string;
  days: { day: string; temp: number }[];
  /** Days whose mean is DLY-TAVG-NORMAL, and days whose mean is (TMAX + TMIN)/2 because TAVG was missing. */
  fromAverage: number;
  fromMaxMin: number;
  /** Whether the file had a 02-29 row (read and checked, not a day of the 365-day year). */
  hadFebruary29: boolean;
  fileUnit: TemperatureUnit;
  /** How each day's temperature was taken, in words. */
  method: string;
}

function convert(value: number, from: TemperatureUnit, to: TemperatureUnit): number {
  if (from === to) return value;
  // NIST SP 811: t/°C = (t/°F − 32)/1.8; rounded to 1e-6 so the stored year does not carry binary noise.
  const converted = to === 'C' ? fahrenheitToCelsius(value) : celsiusToFahrenheit(value);
  return Math.round(converted * 1e6) / 1e6;
}

/** Read a daily normals CSV file into a 365-day normal year; an ArchiveFormatError names the line and column of the first fault. */
export function readDailyNormalsCsv(text: string, options: NormalsOptions): PublishedNormalYear {
  if (text.length > MAX_ARCHIVE_CHARACTERS) {
    throw new ArchiveFormatError(
      1,
      null,
      `the file has ${text.length} characters; the largest accepted is ${MAX_ARCHIVE_CHARACTERS} (16 MiB)`,
    );
  }
  const fileUnit = options.fileUnit ?? 'F';
  const { header, rows } = readArchiveCsv(text, 'a daily normals CSV file');
  const names = header.record.map((name) => name.trim());
  const position = new Map(names.map((name, i) => [name, i]));
  const stationColumn = position.has('STATION') ? 'STATION' : position.has('GHCN_ID') ? 'GHCN_ID' : null;
  const hasDate = position.has('DATE');
  const hasMonthDay = position.has('month') && position.has('day');
  const hasAverage = position.has(TAVG);
  const hasMaxMin = position.has(TMAX) && position.has(TMIN);
  const lacking = [
    ...(stationColumn ? [] : ['STATION (or GHCN_ID)']),
    ...(hasDate || hasMonthDay ? [] : ['DATE (or month and day)']),
    ...(hasAverage || hasMaxMin ? [] : [`${TAVG} (or ${TMAX} and ${TMIN})`]),
  ];
  if (lacking.length > 0) {
    throw new ArchiveFormatError(
      header.info.lines,
      null,
      `the header lacks ${lacking.join(', ')}: a daily normals CSV header names the station, the day and the daily temperature normals (is this a monthly normals file, or another format?)`,
    );
  }

  const byDay = new Map<string, { temp: number; line: number; fromAverage: boolean }>();
  let stationId: string | null = null;
  let lastLine = header.info.lines;
  for (const { record, info } of rows) {
    const line = info.lines;
    lastLine = line;
    const at = (name: string) => position.get(name)!;
    const cell = (name: string): string => (position.has(name) ? (record[at(name)] ?? '').trim() : '');
    const fail = (name: string, detail: string): never => {
      throw new ArchiveFormatError(line, at(name) + 1, detail, name);
    };
    if (record.length < names.length) {
      throw new ArchiveFormatError(
        line,
        record.length + 1,
        `truncated row: ${record.length} fields, the header has ${names.length}`,
      );
    }
    const id = cell(stationColumn!);
    if (id === '') fail(stationColumn!, 'empty station id');
    if (stationId === null) {
      if (options.expectedStationId !== undefined && id !== options.expectedStationId) {
        fail(stationColumn!, `station id ${id} does not match the expected station ${options.expectedStationId}`);
      }
      stationId = id;
    } else if (id !== stationId) {
      fail(stationColumn!, `station id ${id} differs from ${stationId} on the rows before: one station per file`);
    }

    const day = dayOf(cell, fail, hasDate);
    if (day === '02-29' || NORMAL_YEAR_DAYS.includes(day)) {
      // a calendar day
    } else {
      fail(hasDate && /^\d{2}-\d{2}$/.test(cell('DATE')) ? 'DATE' : 'day', `${day} is not a calendar day`);
    }
    const earlier = byDay.get(day);
    if (earlier) fail(hasDate ? 'DATE' : 'day', `day ${day} repeats line ${earlier.line}`);

    const value = (name: string): number | null => {
      if (!position.has(name)) return null;
      const textValue = cell(name);
      if (textValue === '') return null;
      if (!DECIMAL.test(textValue)) fail(name, `must be a number, got ${JSON.stringify(textValue)}`);
      const number = Number(textValue);
      if (number === MISSING) return null;
      const flag = cell(`meas_flag_${name}`);
      return flag in UNUSABLE_FLAGS ? null : number;
    };
    const average = value(TAVG);
    const high = value(TMAX);
    const low = value(TMIN);
    let temp: number;
    let fromAverage: boolean;
    if (average !== null) {
      temp = average;
      fromAverage = true;
    } else if (high !== null && low !== null) {
      if (low > high) fail(TMIN, `${TMIN} ${low} is above ${TMAX} ${high}`);
      temp = (high + low) / 2;
      fromAverage = false;
    } else {
      fail(
        hasAverage ? TAVG : TMAX,
        `day ${day} has no usable daily normal: ${TAVG} is missing and no ${TMAX}/${TMIN} pair stands in for it`,
      );
    }
    byDay.set(day, { temp: convert(temp!, fileUnit, options.unit), line, fromAverage: fromAverage! });
  }
  if (stationId === null)
    throw new ArchiveFormatError(header.info.lines + 1, null, 'the file holds a header and no daily row');
  const absent = NORMAL_YEAR_DAYS.filter((day) => !byDay.has(day));
  if (absent.length > 0) {
    const listed = absent.slice(0, 10).join(', ');
    throw new ArchiveFormatError(
      lastLine,
      null,
      `the file ends without ${absent.length} calendar day(s) of the year: ${listed}${absent.length > 10 ? ', …' : ''}`,
    );
  }
  const days = NORMAL_YEAR_DAYS.map((day) => ({ day, temp: byDay.get(day)!.temp }));
  const fromAverage = NORMAL_YEAR_DAYS.filter((day) => byDay.get(day)!.fromAverage).length;
  return {
    format: 'noaa-daily-normals-csv',
    archiveStationId: stationId,
    days,
    fromAverage,
    fromMaxMin: 365 - fromAverage,
    hadFebruary29: byDay.has('02-29'),
    fileUnit,
    method: `daily mean = ${TAVG}, else (${TMAX} + ${TMIN})/2; −9999, an empty cell or measurement flag M, V, Y or Z is missing; 02-29 left out of the 365-day year; °${fileUnit} converted once to the station unit`,
  };
}

/** The row's day as MM-DD: DATE when it is MM-DD, else the month and day columns (day 99 marks a monthly row). */
function dayOf(
  cell: (name: string) => string,
  fail: (name: string, detail: string) => never,
  hasDate: boolean,
): string {
  const date = hasDate ? cell('DATE') : '';
  if (/^\d{2}-\d{2}$/.test(date)) return date;
  const month = cell('month');
  const day = cell('day');
  if (month === '' && day === '') fail(hasDate ? 'DATE' : 'day', `must be a day as MM-DD, got ${JSON.stringify(date)}`);
  if (!/^\d{1,2}$/.test(month)) fail('month', `must be a month number, got ${JSON.stringify(month)}`);
  if (day === '99') fail('day', 'day 99 marks a monthly or annual row: this is not a daily normals file');
  if (!/^\d{1,2}$/.test(day)) fail('day', `must be a day number, got ${JSON.stringify(day)}`);
  return `${month.padStart(2, '0')}-${day.padStart(2, '0')}`;
}

/** Where a published normal year comes from, in words: the normal year's stored source (the service) and the CLI's note. */
export function publishedNormalsSource(year: PublishedNormalYear, unit: TemperatureUnit): string {
  const taken =
    year.fromMaxMin === 0
      ? `${TAVG} on every day`
      : `${TAVG} on ${year.fromAverage} days, (${TMAX} + ${TMIN})/2 on ${year.fromMaxMin} where it was missing`;
  const converted = year.fileUnit === unit ? `in °${unit}` : `°${year.fileUnit} converted to °${unit}`;
  return `published daily normals (${year.format}) of station ${year.archiveStationId}: ${taken}; 02-29 ${year.hadFebruary29 ? 'left out' : 'not in the file'}; ${converted}`;
}
