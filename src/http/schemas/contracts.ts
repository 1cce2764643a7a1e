/** A facility's performance contract and its guaranteed savings per contract year. */
import { z } from 'zod';
import { MAX_GUARANTEE_COST, MAX_GUARANTEE_ENERGY } from '../../engine/index.js';
import { boundedNumber, isoDate, plainText } from './common.js';
import { currency } from './rates.js';

const guarantee = z
  .object({
    year: z.number().int().min(1, 'contract years count from 1'),
    energy: boundedNumber(MAX_GUARANTEE_ENERGY).nullable().optional().describe('Guaranteed avoided energy in the contract’s energyUnit'),
    cost: boundedNumber(MAX_GUARANTEE_COST).nullable().optional().describe('Guaranteed cost avoided in the contract currency'),
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
    guarantees: z.array(z.object({ year: z.number().int(), energy: z.number().nullable(), cost: z.number().nullable() })),
    updatedAt: z.string(),
  })
  .meta({ id: 'Contract' });
