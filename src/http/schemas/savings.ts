/** Savings: the query and the savings document as the API returns it. */
import { z } from 'zod';
import { CONFIDENCE_LEVELS } from '../../engine/index.js';
import { isoDate } from './common.js';
import { adjustmentSchema } from './adjustments.js';
import {
  excludedPeriodSchema,
  guideline14CheckSchema,
  modelName,
  overridesSchema,
  stat,
  sufficiencySchema,
  temperatureForm,
  weatherFillsSchema,
} from './baselines.js';

const confidenceText = CONFIDENCE_LEVELS.join(', ');

export const savingsQuery = z
  .object({
    from: isoDate.optional().describe('Only reporting readings starting on or after this date'),
    to: isoDate.optional().describe('Only reporting readings ending on or before this date (end exclusive)'),
    confidence: z.coerce
      .number()
      .refine((value) => (CONFIDENCE_LEVELS as readonly number[]).includes(value), `must be one of ${confidenceText}`)
      .optional()
      .describe(`Two-sided confidence of the stated uncertainty: ${confidenceText} (default 0.68)`),
  })
  .strict()
  .refine((query) => query.from === undefined || query.to === undefined || query.to > query.from, {
    path: ['to'],
    message: 'must be after from',
  });

const uncertainty = z.object({
  fractional: stat.describe('ΔS/S as a positive fraction'),
  absolute: stat.describe('ΔS in the meter’s unit'),
});

export const savingsSchema = z
  .object({
    model: modelName,
    temperatureForm,
    periods: z.array(
      z.object({
        start: z.string(),
        end: z.string(),
        days: z.number().int(),
        meanTemp: stat,
        actual: stat,
        modelBaseline: stat.describe('The frozen model’s projection onto the period’s weather'),
        adjustment: stat.describe('Non-routine adjustments falling in the period (+ adds to the adjusted baseline)'),
        adjustedBaseline: stat.describe('modelBaseline + adjustment'),
        savings: stat,
        outsideBaselineRange: z.boolean(),
        outsideVariableRanges: z
          .array(z.string())
          .optional()
          .describe(
            'Variables whose value in this period lies outside the range the baseline saw (models with variables only)',
          ),
      }),
    ),
    totals: z.object({
      actual: stat,
      modelBaseline: stat,
      adjustments: stat,
      adjustedBaseline: stat,
      savings: stat.describe('Avoided energy: adjusted baseline − actual'),
      fractionSaved: stat,
      confidence: z.number(),
      uncertainty: z.object({
        guideline14: uncertainty,
        exact: uncertainty,
        adjustments: z.object({
          absolute: stat.describe(
            'The non-routine adjustments’ own ± at the confidence, in the meter’s unit (0 when none states one)',
          ),
        }),
        combined: uncertainty.describe(
          'The larger of the model’s two ± combined in quadrature with the adjustments’ ±',
        ),
      }),
      significant: z.boolean(),
      outsideRangeShare: stat,
      outsideVariableRangeShares: z
        .record(z.string(), stat)
        .optional()
        .describe(
          'Per variable: share of the model baseline from periods whose value lies outside the baseline’s range (models with variables only)',
        ),
    }),
    significance: z.object({ rule: z.string(), fractionalAt68: z.object({ guideline14: stat, exact: stat }) }),
    baselineTemperatureRange: z.object({ min: stat, max: stat }),
    uncertaintyInputs: z.object({
      n: z.number().int(),
      nPrime: stat,
      m: z.number().int(),
      p: z.number().int(),
      t: stat,
      autocorrelation: stat,
      cvrmse: stat,
    }),
    baseline: z.object({
      selected: modelName,
      temperatureForm,
      reportingMonths: stat,
      guideline14: guideline14CheckSchema.nullable(),
      sufficiency: sufficiencySchema,
      overrides: overridesSchema,
    }),
    extrapolation: z
      .object({
        share: stat.describe('Share of the reporting days whose weather lies outside what the baseline saw'),
        outsideDays: z.number().int(),
        days: z.number().int(),
        basis: z
          .enum(['daily', 'mean'])
          .describe(
            'daily: each day against the daily range a day-resolved baseline saw; mean: each period mean against the range of baseline means',
          ),
        range: z.object({ min: stat, max: stat }),
        limit: z.number(),
        exceedsLimit: z
          .boolean()
          .describe(
            'Above the limit: savings are refused (422) unless the baseline was frozen with overrides.extrapolation',
          ),
        summary: z.string(),
      })
      .meta({ id: 'ReportingExtrapolation' }),
    excluded: z.object({ baseline: z.array(excludedPeriodSchema), reporting: z.array(excludedPeriodSchema) }),
    meterId: z.string(),
    adjustments: z.array(adjustmentSchema),
    baselineId: z.string(),
    baselineVersion: z.number().int(),
    baselineContentHash: z.string(),
    weatherFills: weatherFillsSchema.describe(
      'Reporting periods whose weather includes days filled on record, by method',
    ),
  })
  .meta({
    id: 'Savings',
    description:
      'Avoided energy against the frozen baseline: the same document as the command line’s savings --json, plus the baseline it rests on',
  });
