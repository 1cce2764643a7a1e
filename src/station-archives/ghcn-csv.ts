/**
 * GHCN-Daily per-station CSV files (by_station/ID.csv). Layout, from NOAA
 * NCEI's readme-by_station.txt
 * (https://www.ncei.noaa.gov/pub/data/ghcn/daily/readme-by_station.txt): no
 * header; one element-day per line, comma-separated:
 *
 *   ID, YEAR/MONTH/DAY (YYYYMMDD), ELEMENT, DATA VALUE, M-FLAG, Q-FLAG,
 *   S-FLAG, OBS-TIME (HHMM, or empty)
 *
 * with elements, units and flags as in section III of the GHCN-Daily
 * readme.txt (temperatures in tenths of °C).
 */
import { isIsoDate } from '../engine/index.js';
import {
  countDropped,
  dayEntry,
  failsQuality,
  ghcnDays,
  GHCN_METHOD,
  GHCN_MISSING,
  isGhcnElement,
  isTemperatureElement,
  type GhcnDayValues,
} from './ghcn-elements.js';
import { ArchiveFormatError, emptyCounts, type ArchiveImport, type ArchiveOptions } from './types.js';

const FIELDS = ['ID', 'YEAR/MONTH/DAY', 'ELEMENT', 'DATA VALUE', 'M-FLAG', 'Q-FLAG', 'S-FLAG', 'OBS-TIME'] as const;
const INTEGER = /^-?\d+$/;

export function readGhcnCsv(text: string, options: ArchiveOptions): ArchiveImport {
  const counts = emptyCounts();
  const byDate = new Map<string, GhcnDayValues>();
  const seen = new Map<string, number>();
  let stationId: string | null = null;
  const lines = text.split(/\r?\n/);
  for (let index = 0; index < lines.length; index++) {
    const lineNumber = index + 1;
    const line = lines[index]!;
    if (line.trim() === '') continue;
    const fields = line.split(',');
    const fail = (field: number, detail: string): never => {
      throw new ArchiveFormatError(lineNumber, field + 1, detail, FIELDS[field]);
    };
    if (fields.length < 7 || fields.length > 8) {
      const hint = line.includes('"') ? ' (a quoted header: is this a GSOD CSV file, format gsod-csv?)' : '';
      throw new ArchiveFormatError(
        lineNumber,
        Math.min(fields.length, 8),
        `${fields.length} fields; a GHCN-Daily by-station line has 8 (ID, date, element, value, three flags, observation time)${hint}`,
      );
    }
    const id = fields[0]!;
    if (stationId === null) {
      if (id.length !== 11) fail(0, `station id ${JSON.stringify(id)} is not the 11 characters of a GHCN-Daily id`);
      if (options.expectedStationId !== undefined && id !== options.expectedStationId) {
        fail(0, `station id ${id} does not match the expected station ${options.expectedStationId}`);
      }
      stationId = id;
    } else if (id !== stationId) {
      fail(0, `station id ${id} differs from ${stationId} on the lines before: one station per file`);
    }
    const compact = fields[1]!;
    const date = /^\d{8}$/.test(compact) ? `${compact.slice(0, 4)}-${compact.slice(4, 6)}-${compact.slice(6, 8)}` : '';
    if (!isIsoDate(date)) fail(1, `must be a real date as YYYYMMDD, got ${JSON.stringify(compact)}`);
    const element = fields[2]!;
    if (!isGhcnElement(element))
      fail(2, `unknown element ${JSON.stringify(element)}: not an element code of the GHCN-Daily readme`);
    const valueText = fields[3]!.trim();
    if (!INTEGER.test(valueText)) fail(3, `must be an integer, got ${JSON.stringify(fields[3])}`);
    const key = `${date} ${element}`;
    const earlier = seen.get(key);
    if (earlier !== undefined) fail(1, `${element} of ${date} repeats line ${earlier}`);
    seen.set(key, lineNumber);
    if (!isTemperatureElement(element)) {
      counts.otherElements++;
      continue;
    }
    const value = Number(valueText);
    const entry = dayEntry(byDate, date, lineNumber);
    if (value === GHCN_MISSING) continue;
    const qflag = fields[5]!;
    if (failsQuality(qflag)) {
      countDropped(counts, qflag);
      continue;
    }
    entry[element] = value;
  }
  if (stationId === null) throw new ArchiveFormatError(1, null, 'the file holds no GHCN-Daily line');
  const days = ghcnDays(byDate, options.unit, counts);
  return { format: 'ghcn-csv', archiveStationId: stationId, days, counts, method: GHCN_METHOD };
}
