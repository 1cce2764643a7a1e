/**
 * What every station-archive reader returns: the days it found, in the
 * station's unit, and an account of what it left out. Pure data: the readers
 * take text and give this back; storing it is the service's business.
 */
import type { TemperatureUnit } from '../engine/index.js';

/** The public daily formats the ledger reads (see README, "Weather from public station archives"). */
export const ARCHIVE_FORMATS = ['ghcn-dly', 'ghcn-csv', 'gsod-csv'] as const;
export type ArchiveFormat = (typeof ARCHIVE_FORMATS)[number];

/** The largest file a reader takes: 16 MiB (30 years of one station is about 1 MB as .dly, 2.5 MB as GSOD CSV). */
export const MAX_ARCHIVE_CHARACTERS = 16 * 1024 * 1024;

/** One day read from a file: its mean, or its minimum and maximum, in the station's unit. */
export interface ArchiveDay {
  date: string;
  /** The daily mean as the file gives it (TAVG, GSOD TEMP); absent when the day is given as tmin and tmax. */
  temp?: number;
  tmin?: number;
  tmax?: number;
  /** The file line the day's first value came from (1-based), for messages. */
  line: number;
}

/** The account of one file: every day the file covers is imported, or missing, and values refused for a quality flag are counted. */
export interface ArchiveCounts {
  /** Distinct calendar days the file holds a temperature record for (a −9999 or 9999.9 counts: the day is in the file). */
  daysRead: number;
  /** Days with a usable temperature (what is written). */
  imported: number;
  /** Temperature values refused because their quality flag says they failed a check. */
  droppedByFlag: number;
  /** Days read that end up with no usable temperature (missing markers, or every value refused by its flag). */
  missing: number;
  /** Refused values by flag, e.g. { I: 2, O: 1 }. */
  droppedFlags: Record<string, number>;
  /** Lines or rows of elements that are not temperatures (precipitation, snow, wind …), skipped. */
  otherElements: number;
}

export interface ArchiveImport {
  format: ArchiveFormat;
  /** The station id the file carries (every line the same). */
  archiveStationId: string;
  /** The days, in date order, in the target unit. */
  days: ArchiveDay[];
  counts: ArchiveCounts;
  /** How each day's temperature was taken from the file, in words. */
  method: string;
}

export interface ArchiveOptions {
  /** The station's unit: every value is converted once, on reading, to it. */
  unit: TemperatureUnit;
  /** When given, every line must carry this station id. */
  expectedStationId?: string;
}

/** A file that does not follow its published layout: the line (1-based) and column (1-based, characters or fields as `columnName` says) of the first fault. */
export class ArchiveFormatError extends Error {
  constructor(
    readonly line: number,
    readonly column: number | null,
    readonly detail: string,
    readonly columnName?: string,
  ) {
    super(`${describePlace(line, column, columnName)}: ${detail}`);
    this.name = 'ArchiveFormatError';
  }

  /** "line 4, column 22" or "line 4, column 4 (DATA VALUE)". */
  get place(): string {
    return describePlace(this.line, this.column, this.columnName);
  }
}

function describePlace(line: number, column: number | null, columnName?: string): string {
  if (column === null) return `line ${line}`;
  return `line ${line}, column ${column}${columnName ? ` (${columnName})` : ''}`;
}

export function emptyCounts(): ArchiveCounts {
  return { daysRead: 0, imported: 0, droppedByFlag: 0, missing: 0, droppedFlags: {}, otherElements: 0 };
}
