/** Issued savings statements: the request, the resource, its workflow steps and the comparison with today's data. */
import { z } from 'zod';
import { CONFIDENCE_LEVELS } from '../../engine/index.js';
import { isoDate, plainText } from './common.js';
import { REPORT_FORMATS } from './reports.js';

const confidenceText = CONFIDENCE_LEVELS.join(', ');

export const statementWindow = z
  .object({
    quarter: z
      .string()
      .regex(/^\d{4}-Q[1-4]$/, 'must be a quarter such as 2026-Q3')
      .optional()
      .describe('A calendar quarter, e.g. 2026-Q3'),
    contractYear: z.number().int('must be a whole number').min(1, 'contract years count from 1').max(50).optional(),
    from: isoDate.optional().describe('First day (with to)'),
    to: isoDate.optional().describe('Day after the last day (exclusive)'),
  })
  .strict()
  .superRefine((w, ctx) => {
    const forms = [
      w.quarter !== undefined,
      w.contractYear !== undefined,
      w.from !== undefined || w.to !== undefined,
    ].filter(Boolean).length;
    if (forms !== 1)
      ctx.addIssue({
        code: 'custom',
        message: 'give exactly one of {quarter}, {contractYear} or {from, to}',
        path: [],
      });
    else if ((w.from === undefined) !== (w.to === undefined))
      ctx.addIssue({
        code: 'custom',
        message: 'a date window needs both from and to',
        path: [w.from === undefined ? 'from' : 'to'],
      });
  })
  .describe('{quarter: "2026-Q3"}, {contractYear: N} or {from, to}');

export const issueStatementBody = z
  .object({
    window: statementWindow,
    facilityId: plainText().min(1).max(100).nullable().optional().describe('Only this facility'),
    confidence: z
      .number()
      .refine((value) => (CONFIDENCE_LEVELS as readonly number[]).includes(value), `must be one of ${confidenceText}`)
      .nullable()
      .optional()
      .describe(`Two-sided confidence of every ±: ${confidenceText}; default the contract’s level (90% without one)`),
    note: plainText().trim().min(1).max(2000).nullable().optional().describe('Shown on the statement'),
  })
  .strict();

export const reasonBody = z.object({ reason: plainText().trim().min(1, 'must not be empty').max(2000) }).strict();

export const voidStatementBody = z
  .object({
    reason: plainText().trim().min(1, 'must not be empty').max(2000),
    replacedBy: plainText().min(1).max(100).nullable().optional().describe('The statement that replaces this one'),
  })
  .strict();

export const approveStatementBody = z.object({}).strict();

export const documentQuery = z
  .object({
    format: z
      .enum(REPORT_FORMATS, { message: `must be one of ${REPORT_FORMATS.join(', ')}` })
      .optional()
      .describe('json (default), csv or html'),
    copy: z.coerce
      .number()
      .int()
      .min(1)
      .max(100)
      .optional()
      .describe('A stored copy by number (1: as issued); default the latest'),
  })
  .strict();

const hashes = z.object({ json: z.string(), csv: z.string(), html: z.string() });
const actor = z.object({ keyId: z.string(), name: z.string(), role: z.string() });

export const statementSchema = z
  .object({
    id: z.string(),
    status: z.enum(['prepared', 'approved', 'rejected', 'voided']),
    window: z
      .object({ from: z.string(), to: z.string(), kind: z.string(), label: z.string() })
      .loose()
      .describe('As requested ({quarter}, {contractYear} or {from, to}) with the dates it resolved to'),
    facilityId: z.string().nullable(),
    confidence: z.number(),
    note: z.string().nullable(),
    auditHead: z.object({ seq: z.number().int(), hash: z.string() }),
    reportHash: z.string().describe('Content hash of the savings report inside the statement'),
    dataThrough: z.string().nullable().describe('Last day (inclusive) of the latest reporting reading counted'),
    contentHashes: hashes.describe('SHA-256 of the current copy’s stored bytes, per format'),
    copies: z.array(
      z.object({ copy: z.number().int(), kind: z.string(), createdAt: z.string(), contentHashes: hashes }),
    ),
    steps: z.array(
      z.object({
        step: z.string(),
        by: actor,
        at: z.string(),
        reason: z.string().nullable(),
        replacedBy: z.string().nullable().optional(),
      }),
    ),
    preparedBy: z.string(),
    preparedAt: z.string(),
    approvedBy: z.string().nullable(),
    approvedAt: z.string().nullable(),
    rejectedBy: z.string().nullable(),
    rejectedAt: z.string().nullable(),
    rejectionReason: z.string().nullable(),
    voidedBy: z.string().nullable(),
    voidedAt: z.string().nullable(),
    voidReason: z.string().nullable(),
    replacedBy: z.string().nullable(),
  })
  .meta({ id: 'Statement' });

export const statementList = z.object({ statements: z.array(statementSchema) });

export const statementComparison = z
  .object({
    statementId: z.string(),
    issued: z.object({
      reportHash: z.string(),
      auditHead: z.object({ seq: z.number(), hash: z.string() }),
      dataThrough: z.string().nullable(),
    }),
    today: z
      .object({
        reportHash: z.string(),
        auditHead: z.object({ seq: z.number(), hash: z.string() }),
        dataThrough: z.string().nullable(),
      })
      .nullable(),
    problem: z.string().nullable(),
    unchanged: z.boolean(),
    changes: z.array(
      z.object({
        kind: z.string(),
        facilityId: z.string().nullable(),
        meterId: z.string().nullable(),
        description: z.string(),
        before: z.union([z.number(), z.string()]).nullable(),
        after: z.union([z.number(), z.string()]).nullable(),
      }),
    ),
    auditSince: z.array(
      z.object({
        seq: z.number(),
        at: z.string(),
        actor: z.string(),
        action: z.string(),
        entityType: z.string(),
        entityId: z.string(),
      }),
    ),
  })
  .meta({ id: 'StatementComparison' });
