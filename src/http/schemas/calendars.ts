import { z } from 'zod';
import { isoDate, name, plainText } from './common.js';

const dayType = name.describe('A day type named in dayTypes');

export const putCalendarBody = z
  .object({
    dayTypes: z
      .array(name)
      .min(1, 'name at least one day type')
      .max(20, 'at most 20 day types')
      .describe(
        'The day types, the reference first (e.g. working, weekend, holiday, break): fits give every other type an indicator',
      ),
    weekly: z
      .array(dayType)
      .length(7, 'needs 7 day types, Monday first')
      .describe('The day type of each weekday, Monday first'),
    exceptions: z
      .array(
        z
          .object({
            start: isoDate.describe('First day'),
            end: isoDate.describe('Day after the last (end exclusive)'),
            dayType,
            note: plainText().trim().max(500, 'must be at most 500 characters').optional(),
          })
          .strict(),
      )
      .max(2000, 'at most 2000 exceptions')
      .describe('Dated exceptions overriding the weekly pattern (terms, breaks, holidays); they never overlap'),
  })
  .strict()
  .describe(
    'Also accepted as text/csv: one exception per row under the header start,end,dayType (note optional); the day types and the weekly pattern then come as the dayTypes and weekly query parameters, or, when those are absent, are kept from the stored calendar (so a new year of term dates is one file).',
  );

const commaList = (what: string) =>
  plainText()
    .max(1000, 'must be at most 1000 characters')
    .optional()
    .describe(`For text/csv bodies: ${what}, separated by commas`);

export const putCalendarQuery = z.object({
  dayTypes: commaList('the day types, the reference first'),
  weekly: commaList('the day type of each weekday, Monday first (7 names)'),
});

export const calendarSchema = z
  .object({
    facilityId: z.string(),
    dayTypes: z.array(z.string()),
    weekly: z.array(z.string()),
    exceptions: z.array(
      z.object({ start: z.string(), end: z.string(), dayType: z.string(), note: z.string().optional() }),
    ),
    updatedAt: z.string(),
    updatedBy: z.string(),
  })
  .meta({ id: 'FacilityCalendar', description: 'A facility’s day types, weekly pattern and dated exceptions' });
