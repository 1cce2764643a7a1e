import { z } from 'zod';
import { name } from './common.js';

export const temperatureUnit = z.enum(['F', 'C']).describe('The unit of every temperature at this station');

export const createStationBody = z.object({ name, temperatureUnit }).strict();

export const stationSchema = z
  .object({ id: z.string(), name: z.string(), temperatureUnit, createdAt: z.string() })
  .meta({ id: 'WeatherStation' });
