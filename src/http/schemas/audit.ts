import { z } from 'zod';
import { isIsoDate } from '../../engine/index.js';
import { PAGE_SIZES } from '../../services/paging.js';
import { pageFields, pageQuery, plainText } from './common.js';

const DATE_TIME = /^(\d{4}-\d{2}-\d{2})T\d{2}:\d{2}(:\d{2}(\.\d{1,9})?)?(Z|[+-]\d{2}:\d{2})$/;

/** YYYY-MM-DD (midnight UTC) or a date-time with its offset. */
export function isDateOrDateTime(text: string): boolean {
  if (isIsoDate(text)) return true;
  const match = DATE_TIME.exec(text);
  return match !== null && isIsoDate(match[1]!) && Number.isFinite(Date.parse(text));
}

export const auditQuery = z
  .object({
    entity: z
      .string()
      .regex(
        /^[a-z][a-z-]{0,49}$/,
        'must be an entity type such as facility, meter, weather-station, baseline, api-key',
      )
      .optional()
      .describe(
        'Only rows about this kind of entity: facility, meter, weather-station, baseline, adjustment, api-key, or one filed under another entity: reading (rows of its meter), rate (its meter), observation (its weather station), normal-year (its weather station), contract (its facility); plurals are accepted',
      ),
    entityId: plainText().min(1).max(100).optional().describe('Only rows about this entity'),
    since: z
      .string()
      .refine(isDateOrDateTime, 'must be a date (YYYY-MM-DD) or a date-time with an offset (2026-01-31T12:00:00Z)')
      .optional()
      .describe('Only rows written at or after this time; a date means its midnight UTC'),
    limit: z.coerce
      .number()
      .int('must be a whole number')
      .min(1, 'must be at least 1')
      .max(1000, 'must be at most 1000')
      .default(100)
      .describe('Rows per page: default 100, at most 1000'),
    after: z.coerce
      .number()
      .int('must be a whole number')
      .min(0, 'must be 0 or more')
      .max(Number.MAX_SAFE_INTEGER, `must be at most ${Number.MAX_SAFE_INTEGER}`)
      .optional()
      .describe('Continue after this sequence number (the `next` of the previous page)'),
    cursor: plainText()
      .min(1, 'must not be empty')
      .max(1000, 'must be at most 1000 characters')
      .optional()
      .describe('The nextCursor of the previous page, unchanged (the same place as `after`)'),
  })
  .strict();

export const auditEntrySchema = z
  .object({
    seq: z.number().int(),
    at: z.string(),
    actor: z.string().describe('The API key id that made the change, or "system"'),
    action: z.string(),
    entityType: z.string(),
    entityId: z.string(),
    before: z.unknown().describe('The entity before the change (null when it was created)'),
    after: z.unknown().describe('The entity after the change (null when it was removed)'),
    hash: z.string(),
    prevHash: z.string(),
  })
  .meta({ id: 'AuditEntry' });

export const auditPageSchema = z
  .object({
    entries: z.array(auditEntrySchema),
    next: z.number().int().optional().describe('Pass as `after` to get the next page; absent on the last page'),
    limit: z.number().int().describe('The page size used (the limit asked for, or the default 100)'),
    nextCursor: z
      .string()
      .nullable()
      .describe('Pass as cursor to get the next page (the same place as `next`); null on the last page'),
  })
  .meta({ id: 'AuditPage' });

const stateDifferenceSchema = z
  .object({
    table: z
      .string()
      .describe(
        'readings, observations, rates, contracts, normal-years, adjustments, api-keys, baselines or frozen_models (a baseline’s compact stored model)',
      ),
    key: z.string().describe('Which row: its meter or station and period or date, or the entity id'),
    difference: z
      .string()
      .describe('What differs, in words: the stored value against the one the audit trail recorded'),
  })
  .meta({ id: 'AuditStateDifference' });

export const verifyQuery = z.object({
  depth: z
    .enum(['chain', 'full'])
    .default('chain')
    .describe(
      'chain: the hash chain, every frozen baseline against the hash its freeze recorded, and each one’s compact stored model against the model its content gives; full: also replay the trail and compare every result-bearing table with it',
    ),
});

export const chainVerdictSchema = z
  .object({
    ok: z
      .boolean()
      .describe('True only when the chain, the frozen baselines and (depth=full) every table agree with the trail'),
    checked: z.number().int().describe('Rows checked'),
    headSeq: z.number().int(),
    headHash: z.string().describe('Hash of the last row: keep it outside the database to detect a cut-off tail later'),
    broken: z
      .object({ seq: z.number().int(), reason: z.string() })
      .optional()
      .describe('The first row where the chain breaks'),
    baselines: z
      .object({ ok: z.boolean(), checked: z.number().int(), differences: z.array(stateDifferenceSchema) })
      .describe(
        'Each frozen or superseded baseline: its stored content against the content hash its freeze row recorded, and its compact stored model (the one reports project with) against the model derived again from that content',
      ),
    replay: z
      .object({
        ok: z.boolean(),
        compared: z.record(z.string(), z.number().int()).describe('Rows compared per table'),
        differenceCount: z.number().int(),
        differences: z.array(stateDifferenceSchema).describe('The first 100 differences'),
      })
      .optional()
      .describe('With depth=full: the tables rebuilt from the audit trail and compared with the stored rows'),
  })
  .meta({ id: 'AuditChainVerdict' });

export const signedCheckpointSchema = z
  .object({
    organisationId: z.string(),
    seq: z.number().int().describe('The audit row signed: the head of the chain at signing'),
    headHash: z.string().describe('That row’s hash'),
    signedAt: z.string().describe('UTC time of signing'),
    keyId: z.string().describe('First 16 hex digits of SHA-256 of the public key (SubjectPublicKeyInfo, DER)'),
    signature: z
      .string()
      .describe(
        'Ed25519 signature (base64) of "mvledger audit checkpoint v1\\n" + canonical JSON of {headHash, organisationId, seq, signedAt}',
      ),
    reason: z
      .enum(['interval', 'statement', 'request'])
      .describe('What made it: the periodic signer, an issued statement, or a request'),
  })
  .meta({ id: 'AuditCheckpoint' });

export const checkpointsQuery = z.object(pageQuery(PAGE_SIZES.records, 'Checkpoints'));

export const checkpointPageSchema = z
  .object({
    publicKey: z
      .object({ keyId: z.string(), pem: z.string().describe('The Ed25519 public key, PEM (SubjectPublicKeyInfo)') })
      .nullable()
      .describe('The key the service signs with now; null when it signs no checkpoints'),
    checkpoints: z.array(signedCheckpointSchema),
    ...pageFields,
  })
  .meta({ id: 'AuditCheckpointPage' });
