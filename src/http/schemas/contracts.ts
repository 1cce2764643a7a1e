/** A facility's performance contract and its guaranteed savings per contract year. */
import { z } from 'zod';
import { CONFIDENCE_LEVELS, MAX_GUARANTEE_COST, MAX_GUARANTEE_ENERGY } from '../../engine/index.js';
import { DEFAULT_CONTRACT_CONFIDENCE, MV_OPTIONS } from '../../services/contracts.js';
import { boundedNumber, isoDate, plainText } from './common.js';
import { currency } from './rates.js';

const guarantee = z
  .object({
    year: z.number().int().min(1, 'contract years count from 1'),
    energy: boundedNumber(MAX_GUARANTEE_ENERGY)
      .nullable()
      .optional()
      .describe('Guaranteed avoided energy in the contract’s energyUnit'),
    cost: boundedNumber(MAX_GUARANTEE_COST)
      .nullable()
      .optional()
      .describe('Guaranteed cost avoided in the contract currency'),
  })
  .strict();

export const putContractBody = z
  .object({
    start: isoDate.describe('First day of contract year 1'),
    years: z.number().int().min(1, 'at least 1').max(50, 'at most 50'),
    currency: currency.nullable().optional(),
    energyUnit: plainText()
      .min(1)
      .max(20)
      .describe('Unit of the energy guarantees: a standard energy unit such as MMBtu, GJ, kWh or therm'),
    guarantees: z.array(guarantee).max(50),
    reference: plainText()
      .trim()
      .min(1)
      .max(200)
      .nullable()
      .optional()
      .describe('The contract’s own reference (number or title)'),
    parties: z
      .array(
        z
          .object({
            role: plainText()
              .trim()
              .min(1, 'must not be empty')
              .max(100)
              .describe('e.g. customer, energy service company'),
            name: plainText().trim().min(1, 'must not be empty').max(200),
          })
          .strict(),
      )
      .max(20)
      .optional()
      .describe('The parties to the contract, each with its role'),
    mvPlanReference: plainText().trim().min(1).max(200).nullable().optional().describe('The M&V plan’s reference'),
    mvOption: z
      .enum(MV_OPTIONS, { message: `must be one of ${MV_OPTIONS.join(', ')}` })
      .nullable()
      .optional()
      .describe('The IPMVP option of the M&V plan (C: whole facility)'),
    confidence: z
      .number()
      .refine(
        (value) => (CONFIDENCE_LEVELS as readonly number[]).includes(value),
        `must be one of ${CONFIDENCE_LEVELS.join(', ')}`,
      )
      .optional()
      .describe(
        `Two-sided confidence of every ± in the contract’s reports and statements unless a request names another: ${CONFIDENCE_LEVELS.join(', ')} (default ${DEFAULT_CONTRACT_CONFIDENCE})`,
      ),
  })
  .strict()
  .describe('Replaces the facility’s contract; the previous terms stay in the audit trail.');

export const contractSchema = z
  .object({
    facilityId: z.string(),
    start: z.string(),
    years: z.number().int(),
    currency: z.string().nullable(),
    energyUnit: z.string(),
    guarantees: z.array(
      z.object({ year: z.number().int(), energy: z.number().nullable(), cost: z.number().nullable() }),
    ),
    updatedAt: z.string(),
    reference: z.string().nullable(),
    parties: z.array(z.object({ role: z.string(), name: z.string() })),
    mvPlanReference: z.string().nullable(),
    mvOption: z.enum(MV_OPTIONS).nullable(),
    confidence: z.number(),
  })
  .meta({ id: 'Contract' });
