/** Importing a public station file: the format, the archive's station id, and the account the import gives back. */
import { z } from 'zod';
import { ARCHIVE_FORMATS } from '../../station-archives/index.js';
import { plainText } from './common.js';

export const archiveFormat = z
  .enum(ARCHIVE_FORMATS)
  .describe(
    'ghcn-dly: GHCN-Daily fixed-width .dly; ghcn-csv: GHCN-Daily by-station CSV; gsod-csv: Global Summary of the Day CSV',
  );

export const importQuery = z
  .object({
    format: archiveFormat,
    station: plainText()
      .trim()
      .min(1)
      .max(40)
      .optional()
      .describe('The archive’s station id the file must carry on every line (e.g. the 11-character GHCN-Daily id)'),
  })
  .strict();

export const importBody = z
  .string()
  .describe(
    'The station file itself, as published, sent as plain text (Content-Type text/plain, or the CSV media type for the CSV formats).',
  );

const counts = z.object({
  daysRead: z.number().int().describe('Distinct days the file holds a temperature record for'),
  imported: z.number().int().describe('Days with a usable temperature, written'),
  droppedByFlag: z.number().int().describe('Values refused for a failing quality flag'),
  missing: z.number().int().describe('Days read that have no usable temperature'),
  droppedFlags: z.record(z.string(), z.number().int()).describe('Refused values by quality flag'),
  otherElements: z.number().int().describe('Lines or rows of non-temperature elements, skipped'),
});

export const importResult = z
  .object({
    stationId: z.string(),
    format: archiveFormat,
    archiveStationId: z.string(),
    method: z.string(),
    counts,
    firstDate: z.string().nullable(),
    lastDate: z.string().nullable(),
    created: z.number().int(),
    updated: z.number().int(),
    unchanged: z.number().int(),
  })
  .meta({ id: 'WeatherImport' });
