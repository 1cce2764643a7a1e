import { z } from 'zod';
import { name, plainText } from './common.js';

export const FUELS = [
  'electricity',
  'natural-gas',
  'fuel-oil',
  'propane',
  'district-heat',
  'district-cooling',
  'water',
  'other',
] as const;

export const fuel = z.enum(FUELS).describe('What the meter measures');

export const createMeterBody = z
  .object({
    name,
    fuel,
    unit: plainText()
      .trim()
      .min(1, 'must not be empty')
      .max(40, 'must be at most 40 characters')
      .describe('The unit every reading of this meter is in, e.g. kWh, therm, MMBtu, GJ, m3'),
    weatherStationId: plainText()
      .min(1, 'must not be empty')
      .max(100)
      .describe('The station whose temperatures this meter is modelled against'),
  })
  .strict();

export const meterSchema = z
  .object({
    id: z.string(),
    facilityId: z.string(),
    name: z.string(),
    fuel: z.string(),
    unit: z.string(),
    weatherStationId: z.string(),
    createdAt: z.string(),
  })
  .meta({ id: 'Meter' });

export const listMetersQuery = z
  .object({
    facilityId: plainText().min(1).max(100).optional().describe("Only this facility's meters"),
  })
  .strict();
