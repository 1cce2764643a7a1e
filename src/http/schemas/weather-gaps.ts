/** Filling a station's gaps on record. */
import { z } from 'zod';
import { idParams, isoDate } from './common.js';

export const gapFillBody = z
  .object({
    from: isoDate.describe('First day of the window to fill'),
    to: isoDate.describe('Day after the last (exclusive)'),
    maxInterpolationDays: z
      .number()
      .int()
      .min(0, 'must be 0 to 31')
      .max(31, 'must be 0 to 31 (longer gaps want a second station)')
      .optional()
      .describe('Longest gap filled by linear interpolation between its observed neighbours (default 2; 0: none)'),
    secondStationId: idParams.shape.id
      .optional()
      .describe('Fill longer gaps from this station by a line fitted on the days both observed'),
    minOverlapDays: z
      .number()
      .int()
      .min(3, 'must be 3 to 3660')
      .max(3660, 'must be 3 to 3660')
      .optional()
      .describe('Fewest shared observed days the second station’s line is fitted on (default 30)'),
  })
  .strict();

const filledDay = z.object({
  date: z.string(),
  temp: z.number(),
  method: z.enum(['interpolation', 'second-station']),
  note: z.string(),
});

export const gapFillResult = z
  .object({
    stationId: z.string(),
    from: z.string(),
    to: z.string(),
    settings: z.object({
      maxInterpolationDays: z.number().int(),
      minOverlapDays: z.number().int(),
      secondStationId: z.string().nullable(),
    }),
    gaps: z.number().int(),
    filled: z.object({ interpolation: z.number().int(), secondStation: z.number().int() }),
    alreadyFilled: z.number().int(),
    leftEmpty: z.array(z.string()),
    offset: z
      .object({
        secondStationId: z.string(),
        intercept: z.number(),
        slope: z.number(),
        rmse: z.number(),
        overlapDays: z.number().int(),
      })
      .nullable(),
    offsetRefused: z.string().nullable(),
    days: z.array(filledDay),
  })
  .meta({ id: 'WeatherGapFill' });
