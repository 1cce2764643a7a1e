/**
 * A normal year: one long-term typical daily mean temperature for each of
 * the 365 days of a year, per station. Feeding it to a model gives
 * normalised use (what the facility uses in a typical year), the basis of
 * normalised savings. Days are 'MM-DD'; 02-29 is left out, so every normal
 * year has 365 days and each day weighs 1.
 */
import type { ShapeFit } from './fit/fit-shape.js';
import { predictPerDay } from './fit/shape-model.js';
import type { TemperatureUnit } from './types.js';
import type { InputProblem } from './input-problem.js';
import { addDays } from './dates.js';
import { fahrenheitToCelsius, isPlausibleTemperature, PLAUSIBLE_TEMPERATURE_F, unitSymbol } from './units.js';

/** The 365 'MM-DD' days of a year without 02-29, in order: '01-01' … '12-31'. */
export const NORMAL_YEAR_DAYS: readonly string[] = Object.freeze(
  // 2025 is a year without 02-29; any such year gives the same days.
  Array.from({ length: 365 }, (_, i) => addDays('2025-01-01', i).slice(5)),
);

const DAY_INDEX = new Map(NORMAL_YEAR_DAYS.map((day, i) => [day, i]));

/** How many missing days a message names before summing up the rest. */
const MISSING_LISTED = 10;

/**
 * Problems in a normal year: each of the 365 days exactly once (unknown,
 * repeated and missing days are refused; 02-29 is not a day of a normal
 * year) and a plausible temperature for each. Missing days are one problem
 * with index −1, as they belong to no record of the input.
 */
export function checkNormalYear(days: readonly { day: string; temp: number }[], unit: TemperatureUnit): InputProblem[] {
  const problems: InputProblem[] = [];
  const seen = new Map<string, number>();
  days.forEach((entry, index) => {
    if (entry.day === '02-29') {
      problems.push({
        index,
        field: 'day',
        message: '02-29 is not a day of a normal year: a normal year has 365 days and 02-29 is left out',
      });
    } else if (!DAY_INDEX.has(entry.day)) {
      problems.push({
        index,
        field: 'day',
        message: `not a day of a normal year: ${JSON.stringify(entry.day)} (expected MM-DD; a normal year has 365 days and 02-29 is left out)`,
      });
    } else if (seen.has(entry.day)) {
      problems.push({
        index,
        field: 'day',
        message: `repeats the day ${entry.day}: a normal year has each of its 365 days exactly once`,
        relatedIndex: seen.get(entry.day)!,
      });
    } else {
      seen.set(entry.day, index);
    }
    if (!Number.isFinite(entry.temp)) problems.push({ index, field: 'temp', message: 'not a finite number' });
    else if (!isPlausibleTemperature(entry.temp, unit)) {
      problems.push({
        index,
        field: 'temp',
        message: `${entry.temp} ${unitSymbol(unit)} is outside the plausible range ${plausibleRange(unit)}`,
      });
    }
  });
  const missing = NORMAL_YEAR_DAYS.filter((day) => !seen.has(day));
  if (missing.length > 0) {
    const listed = missing.slice(0, MISSING_LISTED).join(', ');
    const more = missing.length > MISSING_LISTED ? ` and ${missing.length - MISSING_LISTED} more` : '';
    problems.push({
      index: -1,
      field: 'day',
      message: `missing days: ${listed}${more} (a normal year has all 365 days, 02-29 left out)`,
    });
  }
  return problems;
}

/**
 * Normalised use of a fitted model over a normal year: Σ over the days of
 * the predicted use per day at that day's temperature (each day weighs 1),
 * and how many days lie outside the temperatures the model was fitted on
 * (there it extrapolates). `temps` are the daily temperatures, in the
 * station's unit, usually the 365 of a checked normal year in order.
 */
export function normalYearUse(
  fit: Pick<ShapeFit, 'model' | 'changepoints' | 'rawCoefficients' | 'temperatureRange'>,
  temps: readonly number[],
): { use: number; outsideRangeDays: number } {
  return normalPeriodsUse(
    fit,
    temps.map((meanTemp) => ({ days: 1, meanTemp })),
  );
}

/** The plausible range of units.ts in the station's unit, to one decimal. */
function plausibleRange(unit: TemperatureUnit): string {
  const { min, max } = PLAUSIBLE_TEMPERATURE_F;
  const [low, high] = unit === 'F' ? [min, max] : [fahrenheitToCelsius(min), fahrenheitToCelsius(max)];
  const round1 = (value: number): number => Math.round(value * 10) / 10;
  return `${round1(low)}…${round1(high)} ${unitSymbol(unit)}`;
}

/** A stretch of the normal year as a model sees a reading: its days and their mean temperature. */
export interface NormalPeriod {
  days: number;
  meanTemp: number;
}

/**
 * The normal year as billing periods: one per calendar month, each the mean
 * of its days. A model fitted to monthly bills has only ever seen period
 * means, so it is applied to period means too; fed daily temperatures it
 * would meet colder and warmer days than any bill it was fitted on.
 */
export function normalYearMonths(temps: readonly number[]): NormalPeriod[] {
  const months: NormalPeriod[] = [];
  NORMAL_YEAR_DAYS.forEach((day, i) => {
    const month = Number(day.slice(0, 2)) - 1;
    const current = (months[month] ??= { days: 0, meanTemp: 0 });
    current.meanTemp = (current.meanTemp * current.days + temps[i]!) / (current.days + 1);
    current.days += 1;
  });
  return months;
}

/** A model's use over normal-year periods (Σ days × per-day use at the period's mean), and the days of periods outside its temperature range. */
export function normalPeriodsUse(
  fit: Pick<ShapeFit, 'model' | 'changepoints' | 'rawCoefficients' | 'temperatureRange' | 'variables'>,
  periods: readonly NormalPeriod[],
): { use: number; outsideRangeDays: number } {
  // A normal year has weather only: a model with variables would need typical values of them, which nobody has stated.
  if (fit.variables && fit.variables.length > 0) {
    throw new RangeError(
      `normalised use needs typical values of the model's variables (${fit.variables.join(', ')}); a normal year carries weather only`,
    );
  }
  let use = 0;
  let outsideRangeDays = 0;
  for (const p of periods) {
    use += p.days * predictPerDay(fit.model, fit.changepoints, fit.rawCoefficients, p.meanTemp);
    if (p.meanTemp < fit.temperatureRange.min || p.meanTemp > fit.temperatureRange.max) outsideRangeDays += p.days;
  }
  return { use, outsideRangeDays };
}
