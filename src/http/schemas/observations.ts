import { z } from 'zod';
import { finite, isoDate, pageFields } from './common.js';
import { temperatureUnit } from './weather-stations.js';
import { MAX_RECORDS_PER_BATCH } from '../../domain/limits.js';

export const observationInput = z
  .object({
    date: isoDate,
    temp: finite.optional().describe('Daily mean temperature, in the station unit'),
    tmin: finite.optional().describe('Daily minimum; give with tmax instead of temp'),
    tmax: finite.optional().describe('Daily maximum; give with tmin instead of temp'),
  })
  .strict()
  .describe('A day as {date, temp} or {date, tmin, tmax}; the mean is then (tmin + tmax)/2');

export const putObservationsBody = z
  .object({
    observations: z
      .array(observationInput)
      .min(1, 'at least one observation is needed')
      .max(MAX_RECORDS_PER_BATCH, `at most ${MAX_RECORDS_PER_BATCH} observations per request`),
  })
  .strict()
  .describe('Also accepted as text/csv with the header date,temp or date,tmin,tmax.');

export const putObservationsResult = z
  .object({
    stationId: z.string(),
    received: z.number().int(),
    created: z.number().int(),
    updated: z.number().int(),
    unchanged: z.number().int(),
  })
  .meta({ id: 'ObservationsPut' });

export const observation = z
  .object({
    date: z.string(),
    temp: z.number(),
    tmin: z.number().nullable(),
    tmax: z.number().nullable(),
    filled: z
      .enum(['interpolation', 'second-station'])
      .nullable()
      .describe('How a day without an observation was filled on record; null for an observed day'),
    fillNote: z.string().nullable().describe('What a filled day was filled from; null for an observed day'),
  })
  .meta({ id: 'Observation' });

export const observationsList = z
  .object({ stationId: z.string(), temperatureUnit, observations: z.array(observation), ...pageFields })
  .meta({ id: 'Observations' });
