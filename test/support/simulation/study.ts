/**
 * The layout of a simulated study: when the meter is read, over a baseline
 * (two years of bills, say) and a reporting period after it (one year). The
 * reporting period starts on the baseline's last read date. The start date
 * moves by up to a year from meter to meter, so bills fall on different
 * days of the season.
 */
import { addDays, daysBetween } from '../../../src/engine/dates.js';
import type { Random } from '../../../src/lib/seeded-random.js';
import { BILL_LENGTHS, billReadDates, dailyReadDates, type BillLengths } from './billing.js';

/** A stretch of readings: so many bills (28–33 days each), or so many daily readings. */
export type Span = { bills: number } | { days: number };

export interface StudyDesign {
  baseline: Span;
  /** Null for a baseline-only study (shape-choice runs). */
  reporting: Span | null;
  /** First read date; by default 2030-01-01 plus 0–364 days, drawn. */
  start?: string;
  billLengths?: BillLengths;
}

export interface StudyPlan {
  start: string;
  /** Days from `start` to the last read date: the days that need weather. */
  days: number;
  baselineReads: string[];
  /** Empty for a baseline-only study; else its first date is the baseline's last. */
  reportingReads: string[];
}

/** Two baseline years and one reporting year of bills: 24 then 12 bills of 28–33 days. */
export const TWO_YEARS_THEN_ONE: StudyDesign = { baseline: { bills: 24 }, reporting: { bills: 12 } };

/** Read dates for the design. Draws the start (unless given), then the bill lengths in order. */
export function planStudy(design: StudyDesign, random: Random): StudyPlan {
  const start = design.start ?? addDays('2030-01-01', random.integer(0, 364));
  const lengths = design.billLengths ?? BILL_LENGTHS;
  const readsFor = (from: string, span: Span): string[] =>
    'bills' in span ? billReadDates(from, span.bills, random, lengths) : dailyReadDates(from, span.days);
  const baselineReads = readsFor(start, design.baseline);
  const baselineEnd = baselineReads[baselineReads.length - 1]!;
  const reportingReads = design.reporting ? readsFor(baselineEnd, design.reporting) : [];
  const last = reportingReads[reportingReads.length - 1] ?? baselineEnd;
  return { start, days: daysBetween(start, last), baselineReads, reportingReads };
}
