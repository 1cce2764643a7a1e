/** Non-routine adjustments: the body of a new one and the stored record. */
import { z } from 'zod';
import { beyondBoundPerDay, boundText, MAX_USE_PER_DAY } from '../../engine/index.js';
import { boundedNumber, finite, isoDate, plainText, pageFields } from './common.js';

export const createAdjustmentBody = z
  .object({
    start: isoDate.describe('First day covered'),
    end: isoDate.describe('Day after the last day covered (end exclusive)'),
    quantity: finite
      .optional()
      .describe(
        `Total over [start, end), in the meter’s unit, spread evenly over the days; + adds to the adjusted baseline; at most ±${boundText(MAX_USE_PER_DAY.max)} a day`,
      ),
    perDay: boundedNumber(MAX_USE_PER_DAY).optional().describe('Or a figure per day, in the meter’s unit'),
    uncertainty: finite
      .refine((value) => value >= 0, 'must be at least 0')
      .optional()
      .describe(
        `The engineer’s standard uncertainty (one standard deviation) of the adjustment’s total over [start, end), in the meter’s unit; combined in quadrature with the other adjustments’ and shown beside the model’s ±; at most ${boundText(MAX_USE_PER_DAY.max)} a day`,
      ),
    reason: plainText()
      .trim()
      .min(3, 'must say why (at least 3 characters)')
      .max(2000, 'must be at most 2000 characters')
      .describe('The documented change the weather model cannot see'),
  })
  .strict()
  .refine((body) => body.end > body.start, { path: ['end'], message: 'must be after start' })
  .refine((body) => (body.quantity === undefined) !== (body.perDay === undefined), {
    path: ['quantity'],
    message: 'give either quantity or perDay',
  })
  .superRefine((body, ctx) => {
    const beyond =
      body.quantity === undefined ? null : beyondBoundPerDay(body.quantity, body.start, body.end, MAX_USE_PER_DAY);
    if (beyond) ctx.addIssue({ code: 'custom', path: ['quantity'], message: beyond });
    const beyondUncertainty =
      body.uncertainty === undefined
        ? null
        : beyondBoundPerDay(body.uncertainty, body.start, body.end, MAX_USE_PER_DAY);
    if (beyondUncertainty) ctx.addIssue({ code: 'custom', path: ['uncertainty'], message: beyondUncertainty });
  })
  .describe(
    'A non-routine adjustment: positive figures add to the adjusted baseline (added floor area), negative ones take away (a closed wing).',
  );

export const adjustmentSchema = z
  .object({
    id: z.string(),
    meterId: z.string(),
    start: z.string(),
    end: z.string(),
    quantity: z.number().nullable(),
    perDay: z.number(),
    reason: z.string(),
    uncertainty: z
      .number()
      .nullable()
      .describe(
        'Standard uncertainty (one standard deviation) of the total, in the meter’s unit; null when none was stated',
      ),
    recordedAt: z.string(),
    recordedBy: z.string(),
    withdrawn: z
      .object({ at: z.string(), by: z.string(), reason: z.string() })
      .nullable()
      .describe('Null while the adjustment counts'),
  })
  .meta({ id: 'Adjustment' });

export const withdrawAdjustmentBody = z
  .object({
    reason: plainText()
      .trim()
      .min(3, 'must say why (at least 3 characters)')
      .max(2000, 'must be at most 2000 characters'),
  })
  .strict();

export const adjustmentList = z
  .object({ meterId: z.string(), unit: z.string(), adjustments: z.array(adjustmentSchema), ...pageFields })
  .meta({ id: 'Adjustments' });
