/**
 * GHCN-Daily fixed-width station files (.dly). Layout, from NOAA NCEI's
 * GHCN-Daily readme.txt, section III
 * (https://www.ncei.noaa.gov/pub/data/ghcn/daily/readme.txt): one line per
 * station, year, month and element, 269 characters:
 *
 *   ID 1–11, YEAR 12–15, MONTH 16–17, ELEMENT 18–21, then for each day
 *   d = 1..31 VALUEd (5 characters), MFLAGd, QFLAGd, SFLAGd (1 each),
 *   starting at column 22 + 8(d − 1).
 *
 * Temperatures (TMAX, TMIN, TAVG) are in tenths of °C; −9999 is missing
 * (and fills the days a month does not have).
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

export const DLY_LINE_LENGTH = 269;
/** The last column of VALUE31: a line that stops before it is truncated. */
const LAST_VALUE_END = 266;
const INTEGER = /^ *-?\d+$/;

export function readGhcnDly(text: string, options: ArchiveOptions): ArchiveImport {
  const counts = emptyCounts();
  const byDate = new Map<string, GhcnDayValues>();
  const seenLines = new Map<string, number>();
  let stationId: string | null = null;
  const lines = text.split(/\r?\n/);
  for (let index = 0; index < lines.length; index++) {
    const lineNumber = index + 1;
    const raw = lines[index]!;
    if (raw.trim() === '') continue;
    if (raw.includes(',')) {
      throw new ArchiveFormatError(
        lineNumber,
        raw.indexOf(',') + 1,
        'a comma in a GHCN-Daily fixed-width (.dly) line: this looks like a CSV file (is the format ghcn-csv or gsod-csv?)',
      );
    }
    if (raw.length < LAST_VALUE_END) {
      throw new ArchiveFormatError(
        lineNumber,
        raw.length + 1,
        `truncated line: ${raw.length} characters, a GHCN-Daily .dly line has ${DLY_LINE_LENGTH} (31 days of value and flags)`,
      );
    }
    if (raw.length > DLY_LINE_LENGTH) {
      throw new ArchiveFormatError(
        lineNumber,
        DLY_LINE_LENGTH + 1,
        `line too long: ${raw.length} characters, a .dly line has ${DLY_LINE_LENGTH}`,
      );
    }
    // Trailing blank flags may have been trimmed off by an editor: blanks are what they stood for.
    const line = raw.padEnd(DLY_LINE_LENGTH, ' ');
    const id = line.slice(0, 11);
    if (stationId === null) {
      if (id.trim().length !== 11)
        throw new ArchiveFormatError(
          lineNumber,
          1,
          `station id ${JSON.stringify(id)} is not the 11 characters of a GHCN-Daily id`,
        );
      if (options.expectedStationId !== undefined && id !== options.expectedStationId) {
        throw new ArchiveFormatError(
          lineNumber,
          1,
          `station id ${id} does not match the expected station ${options.expectedStationId}`,
        );
      }
      stationId = id;
    } else if (id !== stationId) {
      throw new ArchiveFormatError(
        lineNumber,
        1,
        `station id ${id} differs from ${stationId} on the lines before: one station per file`,
      );
    }
    const yearText = line.slice(11, 15);
    const monthText = line.slice(15, 17);
    if (!/^\d{4}$/.test(yearText))
      throw new ArchiveFormatError(lineNumber, 12, `YEAR must be four digits, got ${JSON.stringify(yearText)}`);
    if (!/^\d{2}$/.test(monthText) || Number(monthText) < 1 || Number(monthText) > 12) {
      throw new ArchiveFormatError(lineNumber, 16, `MONTH must be 01–12, got ${JSON.stringify(monthText)}`);
    }
    const element = line.slice(17, 21);
    if (!isGhcnElement(element)) {
      throw new ArchiveFormatError(
        lineNumber,
        18,
        `unknown element ${JSON.stringify(element)}: not an element code of the GHCN-Daily readme`,
      );
    }
    const key = `${yearText}-${monthText} ${element}`;
    const earlier = seenLines.get(key);
    if (earlier !== undefined) {
      throw new ArchiveFormatError(lineNumber, 12, `${element} of ${yearText}-${monthText} repeats line ${earlier}`);
    }
    seenLines.set(key, lineNumber);
    if (!isTemperatureElement(element)) {
      counts.otherElements++;
      continue;
    }
    for (let day = 1; day <= 31; day++) {
      const column = 22 + 8 * (day - 1);
      const valueText = line.slice(column - 1, column + 4);
      if (!INTEGER.test(valueText)) {
        throw new ArchiveFormatError(
          lineNumber,
          column,
          `VALUE${day} must be an integer in 5 columns, got ${JSON.stringify(valueText)}`,
        );
      }
      const value = Number(valueText);
      const date = `${yearText}-${monthText}-${String(day).padStart(2, '0')}`;
      if (!isIsoDate(date)) {
        if (value !== GHCN_MISSING) {
          throw new ArchiveFormatError(
            lineNumber,
            column,
            `VALUE${day} is ${value}, but ${yearText}-${monthText} has no day ${day} (expected −9999)`,
          );
        }
        continue;
      }
      const entry = dayEntry(byDate, date, lineNumber);
      if (value === GHCN_MISSING) continue;
      const qflag = line.charAt(column + 5);
      if (failsQuality(qflag)) {
        countDropped(counts, qflag);
        continue;
      }
      entry[element] = value;
    }
  }
  if (stationId === null) throw new ArchiveFormatError(1, null, 'the file holds no GHCN-Daily line');
  const days = ghcnDays(byDate, options.unit, counts);
  return { format: 'ghcn-dly', archiveStationId: stationId, days, counts, method: GHCN_METHOD };
}
