/**
 * Schema pieces shared by every resource. zod is the single source of
 * validation, TypeScript types and the OpenAPI document.
 */
import { z } from 'zod';
import { boundText, isIsoDate, type InputBound } from '../../engine/index.js';

/** A real calendar date, YYYY-MM-DD (2025-02-30 is refused). */
export const isoDate = z
  .string()
  .regex(/^\d{4}-\d{2}-\d{2}$/, 'must be a date as YYYY-MM-DD')
  .refine(isIsoDate, 'is not a real calendar date')
  .meta({ format: 'date', example: '2025-01-31' });

/** A finite number (JSON has no NaN or Infinity, but say so plainly). */
export const finite = z.number().refine(Number.isFinite, 'must be a finite number');

/**
 * A finite number within one of the engine's input bounds (src/engine/bounds.ts),
 * not negative when `nonNegative`; the bound shows in the OpenAPI document
 * as the minimum and maximum.
 */
export function boundedNumber(bound: InputBound, options: { nonNegative?: boolean } = {}) {
  const beyond = `must be within ±${boundText(bound.max)} ${bound.per} (a larger figure is taken as a typing or unit error)`;
  return z
    .number()
    .refine(Number.isFinite, 'must be a finite number')
    .min(options.nonNegative ? 0 : -bound.max, options.nonNegative ? 'must not be negative' : beyond)
    .max(bound.max, beyond);
}

/**
 * Text a client may send. PostgreSQL text cannot hold U+0000, so no text input
 * may carry it (refused on SQLite too, so both databases answer alike).
 */
export const plainText = () =>
  z.string().refine((text) => !text.includes('\u0000'), 'must not contain the NUL character (U+0000)');

export const name = plainText().trim().min(1, 'must not be empty').max(200, 'must be at most 200 characters');

export const idParams = z.object({ id: plainText().min(1).max(100) });

export const problemSchema = z
  .object({
    type: z.string(),
    title: z.string(),
    status: z.number().int(),
    detail: z.string(),
    instance: z.string().optional(),
    errors: z.array(z.object({ field: z.string(), message: z.string() })).optional(),
  })
  .loose()
  .meta({ id: 'Problem', description: 'RFC 9457 problem details' });

/** The error responses every authenticated route can give. */
export const authProblems = {
  400: problemSchema,
  401: problemSchema,
  403: problemSchema,
  404: problemSchema,
} as const;

export const writeProblems = {
  ...authProblems,
  409: problemSchema,
  413: problemSchema,
  415: problemSchema,
  422: problemSchema,
} as const;

export const bearer = [{ bearerAuth: [] as string[] }];

/** Idempotency-Key accepted on every POST. */
export const idempotencyHeaders = z.object({
  'idempotency-key': z
    .string()
    .optional()
    .describe('Replays return the first response; a different request with the same key is refused (422).'),
});

/** Lists answer in pages (services/paging.ts): how many rows, and where the previous page ended. */
export function pageQuery(sizes: { readonly default: number; readonly max: number }, what: string) {
  return {
    limit: z.coerce
      .number()
      .int('must be a whole number')
      .min(1, 'must be at least 1')
      .max(sizes.max, `must be at most ${sizes.max}`)
      .default(sizes.default)
      .describe(`${what} per page: default ${sizes.default}, at most ${sizes.max}`),
    cursor: plainText()
      .min(1, 'must not be empty')
      .max(1000, 'must be at most 1000 characters')
      .optional()
      .describe('The nextCursor of the previous page, unchanged; omit for the first page'),
  };
}

/** What every page adds beside its list. */
export const pageFields = {
  limit: z.number().int().describe('The page size used (the limit asked for, or the default)'),
  nextCursor: z
    .string()
    .nullable()
    .describe(
      'Pass as cursor to get the next page; null on the last page. A list longer than the page size is never answered whole: follow nextCursor until it is null.',
    ),
};
