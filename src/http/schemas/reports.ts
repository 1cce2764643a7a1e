/** The savings report query. The report itself is documented as its three media types. */
import { z } from 'zod';
import { CONFIDENCE_LEVELS } from '../../engine/index.js';
import { isoDate, plainText } from './common.js';

const confidenceText = CONFIDENCE_LEVELS.join(', ');

export const REPORT_FORMATS = ['json', 'csv', 'html'] as const;

export const reportQuery = z
  .object({
    from: isoDate.optional().describe('First day of the window (with to)'),
    to: isoDate.optional().describe('Day after the last day of the window (exclusive)'),
    quarter: z
      .string()
      .regex(/^\d{4}-Q[1-4]$/, 'must be a quarter such as 2026-Q3')
      .optional()
      .describe('A calendar quarter, e.g. 2026-Q3 (instead of from and to)'),
    contractYear: z.coerce
      .number()
      .int('must be a whole number')
      .min(1, 'contract years count from 1')
      .max(50)
      .optional()
      .describe('A contract year of the facilities’ contract'),
    facilityId: plainText().min(1).max(100).optional().describe('Only this facility'),
    format: z
      .enum(REPORT_FORMATS, { message: `must be one of ${REPORT_FORMATS.join(', ')}` })
      .optional()
      .describe('json (default), csv or html'),
    confidence: z.coerce
      .number()
      .refine((value) => (CONFIDENCE_LEVELS as readonly number[]).includes(value), `must be one of ${confidenceText}`)
      .optional()
      .describe(
        `Two-sided confidence of every ±: ${confidenceText} (default: the level the contract names, 0.9 without one)`,
      ),
  })
  .strict();

export const STREAM_FORMATS = ['json', 'csv'] as const;

/** The streamed report's query: the same window and options; JSON or CSV only (HTML is per facility). */
export const streamedReportQuery = reportQuery.extend({
  format: z
    .enum(STREAM_FORMATS, { message: `must be one of ${STREAM_FORMATS.join(', ')}` })
    .optional()
    .describe('json (default) or csv'),
});

export const reportJsonSchema = z
  .object({
    format: z.literal('mvledger-savings-report'),
    version: z.number().int(),
    window: z.object({ from: z.string(), to: z.string(), kind: z.string(), label: z.string() }),
    confidence: z.number(),
    contentHash: z.string().describe('SHA-256 of the canonical JSON of every other field'),
  })
  .loose()
  .meta({
    id: 'SavingsReport',
    description:
      'Portfolio, facility and meter savings with costs, guarantees, adjustments, normalised savings, method, sources and caution',
  });
