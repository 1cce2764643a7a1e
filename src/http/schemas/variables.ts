import { z } from 'zod';
import type { VariableAggregation, VariableKind } from '../../engine/index.js';
import { finite, isoDate, name, pageFields, plainText } from './common.js';
import { MAX_RECORDS_PER_BATCH, MAX_VARIABLE_MAGNITUDE } from '../../domain/limits.js';

const variableKind = z.enum(['daily', 'per-period'] as const satisfies readonly VariableKind[]);
const variableAggregation = z.enum(['mean', 'total'] as const satisfies readonly VariableAggregation[]);

export const createVariableBody = z
  .object({
    name: name.describe(
      'How fits name it (options.variables); unique among the facility’s own variables, or the meter’s',
    ),
    unit: plainText()
      .trim()
      .min(1, 'must not be empty')
      .max(50, 'must be at most 50 characters')
      .describe('e.g. people, units, share'),
    kind: variableKind.describe('daily: one value per date; per-period: values over [start, end) periods'),
    aggregation: variableAggregation.describe(
      'mean: a level holding on each day of its period (occupancy, people); total: an amount spread evenly over its days (units produced)',
    ),
    meterId: plainText()
      .min(1)
      .max(100)
      .optional()
      .describe('A meter of the facility the variable belongs to; absent for a facility-wide one'),
  })
  .strict();

export const variableSchema = z
  .object({
    id: z.string(),
    facilityId: z.string(),
    meterId: z.string().nullable(),
    name: z.string(),
    unit: z.string(),
    kind: variableKind,
    aggregation: variableAggregation,
    createdAt: z.string(),
    createdBy: z.string(),
  })
  .meta({ id: 'Variable', description: 'An independent variable a baseline may carry beside the weather' });

export const variableListSchema = z
  .object({ facilityId: z.string(), variables: z.array(variableSchema), ...pageFields })
  .meta({ id: 'Variables' });

export const variableValueInput = z
  .object({
    date: isoDate.optional().describe('A daily variable’s day'),
    start: isoDate.optional().describe('A per-period variable’s first day'),
    end: isoDate.optional().describe('… and the day after its last (end exclusive)'),
    value: finite.describe(`The value (at most ±${MAX_VARIABLE_MAGNITUDE})`),
  })
  .strict();

const valuesUnit = plainText()
  .trim()
  .min(1, 'must not be empty')
  .max(50, 'must be at most 50 characters')
  .describe(
    "The unit the values are in, as the sender understands it; when given it must be the variable's unit (a batch in another unit is refused with nothing stored, never converted)",
  );

const correctionReason = plainText().trim().min(1, 'must not be empty').max(1000, 'must be at most 1000 characters');

export const postVariableValuesBody = z
  .object({
    values: z
      .array(variableValueInput)
      .min(1, 'at least one value is needed')
      .max(MAX_RECORDS_PER_BATCH, `at most ${MAX_RECORDS_PER_BATCH} values per request`),
    correctionReason: correctionReason
      .optional()
      .describe('Why stored values are being changed; required when the batch changes any'),
    unit: valuesUnit.optional(),
  })
  .strict()
  .describe(
    'Also accepted as text/csv with the header date,value (daily) or start,end,value (per-period); the correction reason and the unit then come as query parameters.',
  );

export const postVariableValuesQuery = z.object({
  correctionReason: correctionReason.optional().describe('For text/csv bodies: why stored values are being changed'),
  unit: valuesUnit.optional().describe('For text/csv bodies: the unit the values are in (checked as in a JSON body)'),
});

export const postVariableValuesResult = z
  .object({
    variableId: z.string(),
    received: z.number().int(),
    created: z.number().int(),
    corrected: z.number().int(),
    unchanged: z.number().int().describe('Values identical to what is stored for the same period'),
  })
  .meta({ id: 'VariableValuesPosted' });

export const variableValuesList = z
  .object({
    variable: variableSchema,
    values: z.array(z.object({ start: z.string(), end: z.string(), value: z.number() })),
    ...pageFields,
  })
  .meta({ id: 'VariableValues' });
