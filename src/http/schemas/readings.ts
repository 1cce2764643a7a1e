import { z } from 'zod';
import { boundText, MAX_COST_PER_DAY, MAX_USE_PER_DAY } from '../../engine/index.js';
import { finite, isoDate, pageFields, pageQuery, plainText } from './common.js';
import { PAGE_SIZES } from '../../services/paging.js';
import { MAX_RECORDS_PER_BATCH } from '../../domain/limits.js';

const nonNegative = finite.refine((value) => value >= 0, 'must not be negative');

export const readingInput = z
  .object({
    start: isoDate.describe('First day of the period'),
    end: isoDate.describe('Day after the last day of the period (the next read date)'),
    quantity: nonNegative.describe(
      `Energy over the period, in the meter's unit; at most ${boundText(MAX_USE_PER_DAY.max)} a day (quantity / days)`,
    ),
    estimated: z.boolean().optional().describe('The reading is an estimate, not an actual read (default false)'),
    cost: nonNegative
      .nullable()
      .optional()
      .describe(`Billed cost of the period, if known; at most ${boundText(MAX_COST_PER_DAY.max)} a day (cost / days)`),
  })
  .strict();

const correctionReason = plainText().trim().min(1, 'must not be empty').max(1000, 'must be at most 1000 characters');

export const postReadingsBody = z
  .object({
    readings: z
      .array(readingInput)
      .min(1, 'at least one reading is needed')
      .max(MAX_RECORDS_PER_BATCH, `at most ${MAX_RECORDS_PER_BATCH} readings per request`),
    correctionReason: correctionReason
      .optional()
      .describe('Why stored readings are being changed; required when the batch changes any'),
  })
  .strict()
  .describe(
    'Also accepted as text/csv with the header start,end,quantity[,estimated,cost]; the correction reason then comes as the correctionReason query parameter.',
  );

export const postReadingsQuery = z.object({
  correctionReason: correctionReason.optional().describe('For text/csv bodies: why stored readings are being changed'),
});

export const postReadingsResult = z
  .object({
    meterId: z.string(),
    received: z.number().int(),
    created: z.number().int(),
    corrected: z.number().int(),
    unchanged: z.number().int().describe('Readings identical to what is stored under the same start and end'),
  })
  .meta({ id: 'ReadingsPosted' });

/** Both ends optional; `to` must be after `from`. */
export const dateRangeQuery = z.object({
  from: isoDate.optional(),
  to: isoDate.optional(),
});

export const storedReading = z
  .object({
    id: z
      .string()
      .describe('The reading’s id within its meter: its period, start..end (what a baseline’s exclusions name)'),
    start: z.string(),
    end: z.string(),
    days: z.number().int(),
    quantity: z.number(),
    estimated: z.boolean(),
    cost: z.number().nullable(),
  })
  .meta({ id: 'Reading' });

export const readingsList = z
  .object({ meterId: z.string(), unit: z.string(), readings: z.array(storedReading), ...pageFields })
  .meta({ id: 'Readings' });

/** A date range and a page of a series (readings, observations). */
export const seriesQuery = (what: string) =>
  z.object({ ...dateRangeQuery.shape, ...pageQuery(PAGE_SIZES.series, what) });
