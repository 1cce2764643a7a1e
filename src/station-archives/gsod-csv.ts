/**
 * NOAA Global Summary of the Day (GSOD) CSV files, one station-year per file
 * (global-summary-of-the-day/access/YYYY/STATION.csv). Layout, from NOAA
 * NCEI's GSOD readme.txt
 * (https://www.ncei.noaa.gov/data/global-summary-of-the-day/doc/readme.txt)
 * and its sample.csv: a quoted header, then one row per day with, among
 * others,
 *
 *   STATION (11 digits: USAF and WBAN), DATE (YYYY-MM-DD),
 *   TEMP (mean, °F to tenths), TEMP_ATTRIBUTES (observations in the mean),
 *   MAX, MAX_ATTRIBUTES, MIN, MIN_ATTRIBUTES (°F to tenths; the attribute
 *   "*" says the extreme was taken from the hourly data, blank that it was
 *   reported explicitly).
 *
 * 9999.9 is missing. GSOD carries no quality flag that marks a value as
 * failed, so nothing is dropped by flag; the daily mean is TEMP (the mean of
 * the day's observations), or (MAX + MIN)/2 where TEMP is missing.
 */
import { readArchiveCsv } from './archive-csv.js';
import { fahrenheitToCelsius, isIsoDate, type TemperatureUnit } from '../engine/index.js';
import { ArchiveFormatError, emptyCounts, type ArchiveDay, type ArchiveImport, type ArchiveOptions } from './types.js';

const REQUIRED = ['STATION', 'DATE', 'TEMP', 'TEMP_ATTRIBUTES', 'MAX', 'MIN'] as const;
const GSOD_MISSING = 9999.9;
const DECIMAL = /^-?\d+(\.\d+)?$/;

export const GSOD_METHOD =
  'daily mean = TEMP (the mean of the day’s observations), else (MAX + MIN)/2; 9999.9 is missing; GSOD has no failing quality flag; °F converted once to the station unit';

/** °F → the station's unit (NIST SP 811: t/°C = (t/°F − 32)/1.8, exact). */
function fahrenheitTo(value: number, unit: TemperatureUnit): number {
  return unit === 'F' ? value : fahrenheitToCelsius(value);
}

/** GSOD ids are written with or without a hyphen between USAF and WBAN (725300-94846); compare them without. */
function normaliseId(id: string): string {
  return id.trim().replace(/-/g, '');
}

export function readGsodCsv(text: string, options: ArchiveOptions): ArchiveImport {
  const { header, rows } = readArchiveCsv(text, 'a GSOD CSV file');
  const columns = header.record.map((name) => name.trim().toUpperCase());
  const position = new Map(columns.map((name, i) => [name, i]));
  const absent = REQUIRED.filter((name) => !position.has(name));
  if (absent.length > 0) {
    throw new ArchiveFormatError(
      header.info.lines,
      null,
      `the header lacks ${absent.join(', ')}: a GSOD CSV header names STATION, DATE, TEMP, TEMP_ATTRIBUTES, MAX, MIN among others (is this another format?)`,
    );
  }
  const at = (name: string): number => position.get(name)!;
  const counts = emptyCounts();
  const days: ArchiveDay[] = [];
  const seen = new Map<string, number>();
  const expected = options.expectedStationId === undefined ? undefined : normaliseId(options.expectedStationId);
  let stationId: string | null = null;
  for (const { record, info } of rows) {
    const line = info.lines;
    const cell = (name: string): string => (record[at(name)] ?? '').trim();
    const fail = (name: string, detail: string): never => {
      throw new ArchiveFormatError(line, at(name) + 1, detail, name);
    };
    if (record.length < columns.length) {
      throw new ArchiveFormatError(
        line,
        record.length + 1,
        `truncated row: ${record.length} fields, the header has ${columns.length}`,
      );
    }
    const id = normaliseId(cell('STATION'));
    if (stationId === null) {
      if (!/^[0-9A-Z]{11}$/.test(id))
        fail('STATION', `station id ${JSON.stringify(cell('STATION'))} is not the 11 characters of a GSOD id`);
      if (expected !== undefined && id !== expected)
        fail('STATION', `station id ${id} does not match the expected station ${expected}`);
      stationId = id;
    } else if (id !== stationId) {
      fail('STATION', `station id ${id} differs from ${stationId} on the rows before: one station per file`);
    }
    const date = cell('DATE');
    if (!isIsoDate(date)) fail('DATE', `must be a real date as YYYY-MM-DD, got ${JSON.stringify(date)}`);
    const earlier = seen.get(date);
    if (earlier !== undefined) fail('DATE', `${date} repeats line ${earlier}`);
    seen.set(date, line);
    const number = (name: string): number | null => {
      const text = cell(name);
      if (!DECIMAL.test(text))
        fail(name, `must be a number (°F to tenths, 9999.9 when missing), got ${JSON.stringify(text)}`);
      const value = Number(text);
      return value === GSOD_MISSING ? null : value;
    };
    const temp = number('TEMP');
    const max = number('MAX');
    const min = number('MIN');
    const count = cell('TEMP_ATTRIBUTES');
    if (!/^\d+$/.test(count))
      fail('TEMP_ATTRIBUTES', `must be the count of observations in the mean, got ${JSON.stringify(count)}`);
    counts.daysRead++;
    if (temp !== null) days.push({ date, temp: fahrenheitTo(temp, options.unit), line });
    else if (max !== null && min !== null)
      days.push({ date, tmin: fahrenheitTo(min, options.unit), tmax: fahrenheitTo(max, options.unit), line });
    else {
      counts.missing++;
      continue;
    }
    counts.imported++;
  }
  if (stationId === null) throw new ArchiveFormatError(header.info.lines, null, 'the file holds a header but no day');
  days.sort((a, b) => (a.date < b.date ? -1 : a.date > b.date ? 1 : 0));
  return { format: 'gsod-csv', archiveStationId: stationId, days, counts, method: GSOD_METHOD };
}
