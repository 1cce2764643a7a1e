import { z } from 'zod';
import { MAX_FLOOR_AREA } from '../../engine/index.js';
import { boundedNumber, name, plainText } from './common.js';

export const createFacilityBody = z
  .object({
    name,
    address: plainText()
      .trim()
      .min(1, 'must not be empty')
      .max(500, 'must be at most 500 characters')
      .nullable()
      .optional(),
    floorArea: boundedNumber(MAX_FLOOR_AREA)
      .positive('must be greater than 0')
      .nullable()
      .optional()
      .describe('Conditioned floor area, in the unit the organisation uses throughout (ft² or m²)'),
  })
  .strict();

export const facilitySchema = z
  .object({
    id: z.string(),
    name: z.string(),
    address: z.string().nullable(),
    floorArea: z.number().nullable(),
    createdAt: z.string(),
  })
  .meta({ id: 'Facility' });
