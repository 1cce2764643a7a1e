/**
 * Readers of public daily station archives: text in, days in the station's
 * unit and an account of what was left out. Pure: no HTTP, no SQL, no files,
 * no clock; the service and the command line call `readStationArchive`.
 */
import { readGhcnCsv } from './ghcn-csv.js';
import { readGhcnDly } from './ghcn-dly.js';
import { readGsodCsv } from './gsod-csv.js';
import {
  ArchiveFormatError,
  MAX_ARCHIVE_CHARACTERS,
  type ArchiveFormat,
  type ArchiveImport,
  type ArchiveOptions,
} from './types.js';

export * from './types.js';

const READERS: Record<ArchiveFormat, (text: string, options: ArchiveOptions) => ArchiveImport> = {
  'ghcn-dly': readGhcnDly,
  'ghcn-csv': readGhcnCsv,
  'gsod-csv': readGsodCsv,
};

/** Read one station file in the named format; an ArchiveFormatError names the line and column of the first fault. */
export function readStationArchive(format: ArchiveFormat, text: string, options: ArchiveOptions): ArchiveImport {
  if (text.length > MAX_ARCHIVE_CHARACTERS) {
    throw new ArchiveFormatError(
      1,
      null,
      `the file has ${text.length} characters; the largest accepted is ${MAX_ARCHIVE_CHARACTERS} (16 MiB): split it by years`,
    );
  }
  return READERS[format](text, options);
}
export {
  NORMALS_FORMATS,
  publishedNormalsSource,
  readDailyNormalsCsv,
  type NormalsFormat,
  type NormalsOptions,
  type PublishedNormalYear,
} from './daily-normals-csv.js';
