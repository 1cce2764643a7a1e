/** A station's normal year: 365 daily mean temperatures for normalised savings. */
import { z } from 'zod';
import { finite, plainText } from './common.js';
import { temperatureUnit } from './weather-stations.js';
import { NORMALS_FORMATS } from '../../station-archives/index.js';

export const putNormalYearBody = z
  .object({
    source: plainText()
      .trim()
      .min(3, 'must say where the normal year comes from')
      .max(500)
      .describe('Where the normal year comes from (e.g. a 30-year mean of the station’s records)'),
    days: z
      .array(
        z
          .object({
            day: z.string().regex(/^\d{2}-\d{2}$/, 'must be a day as MM-DD'),
            temp: finite.describe('Daily mean, in the station’s unit'),
          })
          .strict(),
      )
      .min(1, 'the 365 days of a normal year are needed')
      .max(366, 'a normal year has 365 days'),
  })
  .strict()
  .describe(
    'Every day 01-01..12-31 once (02-29 left out). Also accepted as text/csv with the header day,temp and the source in the X-Normal-Year-Source header.',
  );

export const normalYearSchema = z
  .object({
    stationId: z.string(),
    temperatureUnit,
    source: z.string(),
    contentHash: z.string(),
    days: z.array(z.object({ day: z.string(), temp: z.number() })),
    updatedAt: z.string(),
  })
  .meta({ id: 'NormalYear' });

export const normalYearFromHistoryBody = z
  .object({
    fromYear: z
      .number()
      .int()
      .min(1800, 'must be 1800 to 2200')
      .max(2200, 'must be 1800 to 2200')
      .describe('First calendar year'),
    toYear: z
      .number()
      .int()
      .min(1800, 'must be 1800 to 2200')
      .max(2200, 'must be 1800 to 2200')
      .describe('Last calendar year, included'),
    windowDays: z
      .number()
      .int()
      .min(1, 'must be an odd number of days from 1 to 61')
      .max(61, 'must be an odd number of days from 1 to 61')
      .refine((n) => n % 2 === 1, 'must be an odd number of days from 1 to 61')
      .optional()
      .describe('Width of the centred moving mean that smooths the calendar-day means (odd; default 15)'),
  })
  .strict();

export const normalsFormat = z
  .enum(NORMALS_FORMATS)
  .describe(
    'noaa-daily-normals-csv: NOAA daily climate normals, one station per file (the access CSV or the by-station archive CSV)',
  );

export const publishedNormalsQuery = z
  .object({
    format: normalsFormat,
    station: plainText()
      .trim()
      .min(1)
      .max(40)
      .optional()
      .describe('The archive’s station id every row must carry (the GHCN-Daily id of the normals file)'),
    fileUnit: temperatureUnit
      .optional()
      .describe('The unit of the file’s values (default F, as the published files are)'),
  })
  .strict();

export const publishedNormalsBody = z
  .string()
  .describe('The published daily normals file itself, as text (Content-Type text/plain or text/csv).');
