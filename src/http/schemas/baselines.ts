/** Baselines: request bodies and the fit document as the API returns it. */
import { z } from 'zod';
import { MAX_POINTS_PER_SEGMENT, MODEL_NAMES, TEMPERATURE_FORMS } from '../../engine/index.js';
import { isoDate, name, plainText, pageFields } from './common.js';

/** A statistic: JSON has no NaN or Infinity, so a non-finite value is sent as null. */
export const stat = z.number().nullable();

export const modelName = z.enum(MODEL_NAMES).describe('A changepoint shape, named as ASHRAE Guideline 14 names it');

export const temperatureForm = z
  .enum(TEMPERATURE_FORMS)
  .describe(
    'How each reading’s weather enters the model: daily (day-resolved: the mean over its days of the daily response) or mean (the response at its mean temperature)',
  );

/** Most variables one fit may be offered: each adds a column and a parameter (our own limit). */
export const MAX_FIT_VARIABLES = 10;

const text = (max: number) =>
  plainText().trim().min(1, 'must not be empty').max(max, `must be at most ${max} characters`);

export const baselineOptions = z
  .object({
    minCoverage: z
      .number()
      .gt(0, 'must be above 0')
      .lte(1, 'must be at most 1')
      .optional()
      .describe('Share of a period’s days that must have weather (default 0.9)'),
    significanceLevel: z
      .number()
      .gt(0, 'must be above 0')
      .lt(1, 'must be below 1')
      .optional()
      .describe('Two-sided α of the slope t-tests and the F-test (default 0.05)'),
    minPointsPerSegment: z
      .number()
      .int('must be a whole number')
      .min(1, 'must be at least 1')
      .max(MAX_POINTS_PER_SEGMENT, `must be at most ${MAX_POINTS_PER_SEGMENT}`)
      .optional()
      .describe('Fewest periods in each segment of a changepoint shape (default 3)'),
    allowSameSignFourPoint: z
      .boolean()
      .optional()
      .describe('Accept a 4P whose two slopes have the same sign (default false)'),
    temperature: temperatureForm
      .optional()
      .describe(
        'How each reading’s weather enters the fit: daily (day-resolved: each bill against the mean over its days of the daily response, the variable-base degree-day method) or mean (the response at its mean temperature). Default: daily wherever daily weather covers the readings. A frozen baseline keeps its form.',
      ),
    variables: z
      .array(name)
      .max(MAX_FIT_VARIABLES, `at most ${MAX_FIT_VARIABLES} variables`)
      .optional()
      .describe(
        'Stored variables (POST /v1/facilities/{id}/variables) the fit may carry beside the weather, by name: the meter’s own, else its facility’s. Each must earn its place by its t-test and the partial F-test; every baseline period needs its values (422 naming the dates otherwise).',
      ),
    variableOverrides: z
      .array(
        z
          .object({
            name,
            include: z.boolean().describe('true: kept whatever the tests say; false: left out'),
            reason: text(2000).describe('Why (kept with the baseline)'),
          })
          .strict(),
      )
      .max(MAX_FIT_VARIABLES, `at most ${MAX_FIT_VARIABLES} decisions`)
      .optional()
      .describe('The engineer’s decisions on variables, each with its reason on record'),
    dayTypes: z
      .boolean()
      .optional()
      .describe(
        'Offer the facility calendar’s day types (PUT /v1/facilities/{id}/calendar) as indicator variables named "day type: NAME", every type but the first: one shared set of changepoints and slopes with a shift of the use per day for each day type (daily readings), or for bills the share of their days of each type. Each must earn its place like any variable.',
      ),
  })
  .strict();

export const exclusionInput = z
  .object({
    readingId: z.string().min(1).max(100).optional().describe('The reading’s id, as the readings API returns it'),
    start: isoDate.optional().describe('Or the reading’s period: its first day …'),
    end: isoDate.optional().describe('… and the day after it (end exclusive)'),
    reason: text(2000).describe(
      'Why the reading is left out (kept with the baseline, frozen with it and shown in reports)',
    ),
  })
  .strict()
  .refine((e) => e.readingId !== undefined || (e.start !== undefined && e.end !== undefined), {
    message: 'name the reading by readingId or by start and end',
  })
  .describe('A baseline reading the engineer leaves out of the fit, and why');

export const createBaselineBody = z
  .object({
    start: isoDate.describe('First day of the baseline'),
    end: isoDate.describe('Day after the baseline (end exclusive)'),
    options: baselineOptions.optional(),
    exclusions: z
      .array(exclusionInput)
      .max(1000)
      .optional()
      .describe(
        'Readings inside the window to leave out of the fit, each with its reason; more than a fifth of the window’s readings is refused (422)',
      ),
  })
  .strict()
  .refine((body) => body.end > body.start, { path: ['end'], message: 'must be after start' });

export const chooseBody = z
  .object({
    model: modelName,
    reason: text(2000).describe('Why the engineer chose this shape (kept in the baseline and the audit trail)'),
  })
  .strict();

const overrideReason = z
  .object({
    reason: text(2000).describe(
      'Why the check may be passed over: kept with the baseline under its content hash, on the audit trail, and shown on every document that uses it',
    ),
  })
  .strict();

export const freezeBody = z
  .object({
    note: text(2000).describe('What the freeze rests on, e.g. the M&V plan clause'),
    supersedeReason: text(2000)
      .optional()
      .describe('Required when the meter already has a frozen baseline: why it is replaced'),
    overrides: z
      .object({
        shortBaseline: overrideReason
          .optional()
          .describe('Freeze a baseline shorter than a full cycle of seasons (refused otherwise: 422)'),
        extrapolation: overrideReason
          .optional()
          .describe(
            'Let savings project onto reporting weather beyond the extrapolation limit (refused otherwise: 422)',
          ),
      })
      .strict()
      .optional()
      .describe('Checks passed over at freeze, each with its reason'),
  })
  .strict();

export const sufficiencySchema = z
  .object({
    sufficient: z.boolean(),
    reasons: z.array(z.string()).describe('Each unmet rule in words'),
    periods: z.number().int(),
    days: z.number().int(),
    billed: z.boolean().describe('Median period of 7 days or more: the 12-bill rule applies'),
    rule: z.object({ minDays: z.number().int(), minBills: z.number().int(), source: z.string() }),
  })
  .meta({
    id: 'BaselineSufficiency',
    description: 'Whether the baseline covers a full cycle of seasons (common practice: a full year of bills)',
  });

const overrideSchema = z.object({ reason: z.string() }).nullable();
export const overridesSchema = z.object({ shortBaseline: overrideSchema, extrapolation: overrideSchema }).meta({
  id: 'BaselineOverrides',
  description: 'Checks passed over when the baseline was frozen, each with its reason; null where none',
});

const limitCheck = z.object({ value: stat, limit: stat, pass: z.boolean() });
export const guideline14CheckSchema = z
  .object({
    cvrmse: limitCheck,
    nmbe: limitCheck,
    pass: z.boolean(),
    source: z.string(),
    outOfSample: z
      .object({ cvrmse: stat, nmbe: stat, method: z.string() })
      .nullable()
      .optional()
      .describe(
        'The same statistics out of sample (each bill left out, or each calendar month of daily data), beside the in-sample values the Guideline defines',
      ),
    note: z.string().optional().describe('What the in-sample check can and cannot show'),
  })
  .meta({
    id: 'Guideline14Check',
    description: 'ASHRAE Guideline 14 acceptance of a model (limits from memory; see source)',
  });

export const excludedPeriodSchema = z
  .object({ start: z.string(), end: z.string(), index: z.number().int(), reason: z.string() })
  .meta({ id: 'ExcludedPeriod', description: 'A reading left out, and why' });

const candidateSchema = z
  .object({
    model: modelName,
    verdict: z.enum(['selected', 'accepted', 'rejected', 'not-fitted']),
    accepted: z.boolean(),
    reasons: z.array(z.string()),
    parameters: z.record(z.string(), stat),
    coefficients: z.array(
      z.object({
        name: z.string(),
        estimate: stat,
        standardError: stat,
        tStat: stat,
        tStatAdjusted: stat
          .optional()
          .describe('t with the residuals’ lag-1 autocorrelation allowed for (what screening uses)'),
      }),
    ),
    changepoints: z.array(z.object({ name: z.string(), estimate: stat, standardError: stat })),
    segmentCounts: z.record(z.string(), z.number()),
    temperatureRange: z.object({ min: stat, max: stat }).nullable(),
    sse: stat,
    n: z.number().int(),
    p: z.number().int(),
    aicc: stat,
    overFitted: z.boolean().optional().describe('Out-of-sample CV(RMSE) far above the in-sample one'),
    stats: z
      .object({
        r2: stat,
        adjustedR2: stat,
        rmse: stat,
        cvrmse: stat,
        nmbe: stat,
        autocorrelation: stat,
        durbinWatson: stat,
        outOfSample: z
          .object({
            method: z.enum(['leave-one-period-out', 'blocked-by-month']),
            blocks: z.number().int(),
            cvrmse: stat,
            nmbe: stat,
            unavailable: z.string().nullable(),
          })
          .optional()
          .describe('CV(RMSE) and NMBE of predictions of periods left out of the fit (changepoints held)'),
      })
      .nullable(),
    guideline14: guideline14CheckSchema.nullable(),
  })
  .meta({ id: 'Candidate', description: 'One fitted shape with its verdict and reasons' });

export const exclusionSchema = z
  .object({
    readingId: z.string().optional(),
    start: z.string(),
    end: z.string(),
    quantity: z.number(),
    reason: z.string(),
  })
  .meta({ id: 'Exclusion', description: 'A reading the engineer left out of the baseline, and why' });

const variableDecisionSchema = z.object({
  name: z.string(),
  verdict: z.enum(['kept', 'dropped', 'forced-in', 'forced-out']),
  reasons: z.array(z.string()),
  tStat: stat.optional(),
  partialF: stat.optional(),
  pValue: stat.optional(),
});

export const fitDocumentSchema = z
  .object({
    selected: modelName,
    temperatureForm,
    candidates: z.array(candidateSchema),
    periods: z.object({ used: z.number().int(), excluded: z.array(excludedPeriodSchema) }),
    settings: z.object({
      significanceLevel: z.number(),
      minPointsPerSegment: z.number().int(),
      guideline14: z.object({ cvrmse: z.number(), nmbe: z.number(), source: z.string() }),
      minCoverage: z.number(),
      temperatureForm,
    }),
    exclusions: z
      .array(exclusionSchema)
      .optional()
      .describe(
        'Readings the engineer left out, each with its reason (apart from periods.excluded, left out for weather coverage)',
      ),
    variables: z.array(z.string()).optional().describe('Independent variables in the selected model'),
    variableDecisions: z
      .array(variableDecisionSchema)
      .optional()
      .describe('Each candidate variable’s decision and reasons'),
  })
  .meta({
    id: 'FitDocument',
    description:
      'Every candidate shape, the selection and the settings: the same document as the command line’s fit --json',
  });

const baselineFields = {
  id: z.string(),
  meterId: z.string(),
  version: z.number().int(),
  status: z.enum(['draft', 'frozen', 'superseded']),
  start: z.string(),
  end: z.string(),
  options: baselineOptions,
  temperatureForm: temperatureForm.describe(
    'The form the baseline was fitted in; its projections keep it (mean for baselines stored before the day-resolved form)',
  ),
  sufficiency: sufficiencySchema
    .nullable()
    .describe(
      'Whether it covers a full cycle of seasons; a draft that does not is refused at freeze without overrides.shortBaseline',
    ),
  overrides: overridesSchema,
  selected: modelName.describe('The shape the engine selected'),
  chosen: modelName.describe('The shape savings use: the selection unless an engineer chose another'),
  choiceReason: z.string().nullable(),
  warnings: z.array(z.string()).describe('Notes on the choice, e.g. that the chosen shape failed screening'),
  contentHash: z.string().nullable().describe('SHA-256 of the frozen content; null while a draft'),
  note: z.string().nullable(),
  frozenAt: z.string().nullable(),
  frozenBy: z.string().nullable(),
  supersedes: z.string().nullable(),
  supersedeReason: z.string().nullable(),
  createdAt: z.string(),
  createdBy: z.string(),
  exclusions: z
    .array(exclusionSchema)
    .describe(
      'Readings the engineer left out of this baseline, each with its reason (frozen with it); empty when none',
    ),
};

export const baselineSummarySchema = z
  .object(baselineFields)
  .meta({ id: 'BaselineSummary', description: 'A baseline without its fit document' });

/** Periods whose weather includes days filled on record, by method: the baseline's and the reporting periods' alike. */
export const weatherFillsSchema = z.array(
  z
    .object({
      start: z.string(),
      end: z.string(),
      days: z.number().int(),
      interpolation: z.number().int(),
      secondStation: z.number().int(),
      summary: z.string().describe('e.g. "3 of 31 days filled by interpolation"'),
    })
    .meta({ id: 'PeriodWeatherFills' }),
);

const baselineWeatherFills = weatherFillsSchema.describe(
  'The baseline’s periods whose weather includes days filled on record, by method (empty when none); a frozen window’s fills cannot change',
);

export const baselineSchema = z
  .object({ ...baselineFields, fit: fitDocumentSchema, weatherFills: baselineWeatherFills })
  .meta({ id: 'Baseline' });

export const verifiedBaselineSchema = z
  .object({
    ...baselineFields,
    fit: fitDocumentSchema,
    weatherFills: baselineWeatherFills,
    verified: z
      .boolean()
      .describe('The stored content still hashes to contentHash (false for a draft, which has no hash)'),
  })
  .meta({ id: 'VerifiedBaseline' });

export const baselineHistorySchema = z
  .object({ baselines: z.array(baselineSummarySchema), ...pageFields })
  .meta({ id: 'BaselineHistory' });

const point = z.object({ temp: z.number(), usePerDay: z.number() });

export const baselinePointsSchema = z
  .object({
    baselineId: z.string(),
    meterId: z.string(),
    meterName: z.string(),
    useUnit: z.string(),
    temperatureUnit: z.enum(['F', 'C']),
    temperatureForm,
    chosen: modelName,
    selected: modelName,
    periods: z
      .array(
        z.object({
          start: z.string(),
          end: z.string(),
          days: z.number().int(),
          quantity: z.number(),
          usePerDay: z.number(),
          meanTemp: z.number(),
          coverage: z.number(),
          estimated: z.boolean(),
        }),
      )
      .describe('The usable baseline periods, by start: what every shape was fitted to'),
    candidates: z.array(
      z.object({
        model: modelName,
        line: z
          .array(point)
          .describe(
            'Vertices of the shape’s line over the temperatures it saw (the daily ones for a day-resolved fit)',
          ),
        expectedPerDay: z
          .array(stat)
          .describe('The shape’s expected use per day of each period, in the order of periods'),
        residuals: z.array(stat).describe('Each period’s energy residual, quantity − days × expected use per day'),
      }),
    ),
  })
  .meta({
    id: 'BaselinePoints',
    description:
      'The numbers behind the energy signature and residual charts of every fitted shape, for drawing and tabulating them',
  });
