/** Contract rates of a meter: an effective-dated schedule with a yearly escalation. */
import { z } from 'zod';
import { boundText, ESCALATION, MAX_PRICE } from '../../engine/index.js';
import { boundedNumber, finite, isoDate } from './common.js';

export const currency = z.string().regex(/^[A-Z]{3}$/, 'must be a three-letter ISO 4217 code such as USD or EUR');

const rateEntry = z
  .object({
    from: isoDate.describe('First day the rate applies'),
    to: isoDate
      .nullable()
      .optional()
      .describe('Day after the last (exclusive); omit or null for the open-ended last entry'),
    price: boundedNumber(MAX_PRICE, { nonNegative: true }).describe(
      `Currency per unit of the meter (at most ${boundText(MAX_PRICE.max)})`,
    ),
    escalation: finite
      .optional()
      .describe(
        `Yearly escalation as a fraction (0.03 = 3% a year), applied on each anniversary of from; above ${ESCALATION.min} and at most ${ESCALATION.max}; default 0`,
      ),
  })
  .strict();

export const putRatesBody = z
  .object({
    currency,
    rates: z.array(rateEntry).max(1000, 'at most 1000 entries'),
  })
  .strict()
  .describe(
    'Replaces the whole schedule. Entries in date order, each ending where the next begins (no gaps, no overlaps); only the last may be open-ended. An empty list removes every rate.',
  );

export const rateScheduleSchema = z
  .object({
    meterId: z.string(),
    unit: z.string(),
    currency: z.string().nullable(),
    rates: z.array(
      z.object({ from: z.string(), to: z.string().nullable(), price: z.number(), escalation: z.number() }),
    ),
  })
  .meta({ id: 'RateSchedule' });
