import { z } from 'zod';
import { name } from './common.js';

export const temperatureUnit = z.enum(['F', 'C']).describe('The unit of every temperature at this station');

export const createStationBody = z.object({ name, temperatureUnit }).strict();

export const stationSchema = z
  .object({ id: z.string(), name: z.string(), temperatureUnit, createdAt: z.string() })
  .meta({ id: 'WeatherStation' });

const dated = z.object({ date: z.string(), temp: z.number() }).nullable();

export const stationRecordSchema = z
  .object({
    stationId: z.string(),
    temperatureUnit,
    first: z.string().nullable(),
    last: z.string().nullable(),
    spanDays: z.number().int(),
    yearsCovered: z.number(),
    observed: z.number().int(),
    filled: z.object({ interpolation: z.number().int(), secondStation: z.number().int() }),
    missing: z.number().int(),
    shareMissing: z.number(),
    shareFilled: z.number(),
    min: dated,
    max: dated,
    outsideBounds: z.number().int().describe('Days outside the plausible range, −80…140 °F in the station’s unit'),
    years: z.array(
      z.object({
        year: z.number().int(),
        days: z.number().int(),
        observed: z.number().int(),
        filled: z.number().int(),
        missing: z.number().int(),
      }),
    ),
  })
  .meta({ id: 'StationRecord' });
