/**
 * Checks on readings and weather before any fit. Each problem names the
 * record (its index in the input) and the field, so a caller can point at a
 * CSV row or a JSON path. The engine never repairs input.
 */
import type { DailyTemperature, Reading, TemperatureUnit } from './types.js';
import { parseIsoDate } from './dates.js';
import { beyondBoundPerDay, MAX_USE_PER_DAY } from './bounds.js';
import type { InputProblem } from './input-problem.js';
import { isPlausibleTemperature, PLAUSIBLE_TEMPERATURE_F, fahrenheitToCelsius, unitSymbol } from './units.js';

/**
 * Problems in a list of readings: bad dates, end ≤ start, bad quantities
 * (not finite, negative, or beyond the use-per-day bound of bounds.ts),
 * duplicates and overlaps.
 */
export function checkReadings(readings: readonly Reading[]): InputProblem[] {
  const problems: InputProblem[] = [];
  const valid: { index: number; start: number; end: number }[] = [];
  readings.forEach((reading, index) => {
    const start = parseIsoDate(reading.start);
    const end = parseIsoDate(reading.end);
    if (start === null)
      problems.push({
        index,
        field: 'start',
        message: `not a valid date (YYYY-MM-DD): ${JSON.stringify(reading.start)}`,
      });
    if (end === null)
      problems.push({ index, field: 'end', message: `not a valid date (YYYY-MM-DD): ${JSON.stringify(reading.end)}` });
    if (!Number.isFinite(reading.quantity)) problems.push({ index, field: 'quantity', message: 'not a finite number' });
    else if (reading.quantity < 0)
      problems.push({ index, field: 'quantity', message: `negative (${reading.quantity})` });
    else {
      const beyond = beyondBoundPerDay(reading.quantity, reading.start, reading.end, MAX_USE_PER_DAY);
      if (beyond) problems.push({ index, field: 'quantity', message: beyond });
    }
    if (start !== null && end !== null) {
      if (end <= start)
        problems.push({ index, field: 'end', message: `end ${reading.end} is not after start ${reading.start}` });
      else valid.push({ index, start, end });
    }
  });
  valid.sort((a, b) => a.start - b.start || a.end - b.end);
  // Compare each period with the one reaching furthest so far, so a long bill
  // is caught against every shorter bill inside it, not only the next one.
  let reach: (typeof valid)[number] | undefined;
  for (const current of valid) {
    if (reach) {
      const earlier = readings[reach.index]!;
      if (current.start === reach.start && current.end === reach.end) {
        problems.push({
          index: current.index,
          field: 'start',
          message: `duplicates the period ${earlier.start}..${earlier.end}`,
          relatedIndex: reach.index,
        });
      } else if (current.start < reach.end) {
        problems.push({
          index: current.index,
          field: 'start',
          message: `overlaps the period ${earlier.start}..${earlier.end}`,
          relatedIndex: reach.index,
        });
      }
    }
    if (!reach || current.end > reach.end) reach = current;
  }
  return problems.sort((a, b) => a.index - b.index);
}

/** Problems in daily weather: bad dates, repeated dates, implausible temperatures. */
export function checkWeather(weather: readonly DailyTemperature[], unit: TemperatureUnit): InputProblem[] {
  const problems: InputProblem[] = [];
  const seen = new Map<string, number>();
  const low = unit === 'F' ? PLAUSIBLE_TEMPERATURE_F.min : fahrenheitToCelsius(PLAUSIBLE_TEMPERATURE_F.min);
  const high = unit === 'F' ? PLAUSIBLE_TEMPERATURE_F.max : fahrenheitToCelsius(PLAUSIBLE_TEMPERATURE_F.max);
  weather.forEach((day, index) => {
    if (parseIsoDate(day.date) === null) {
      problems.push({ index, field: 'date', message: `not a valid date (YYYY-MM-DD): ${JSON.stringify(day.date)}` });
    } else if (seen.has(day.date)) {
      problems.push({
        index,
        field: 'date',
        message: `repeats the date ${day.date}`,
        relatedIndex: seen.get(day.date)!,
      });
    } else {
      seen.set(day.date, index);
    }
    if (!Number.isFinite(day.temp)) problems.push({ index, field: 'temp', message: 'not a finite number' });
    else if (!isPlausibleTemperature(day.temp, unit)) {
      problems.push({
        index,
        field: 'temp',
        message: `${day.temp} ${unitSymbol(unit)} is outside the plausible range ${round1(low)}…${round1(high)} ${unitSymbol(unit)}`,
      });
    }
  });
  return problems;
}

function round1(value: number): number {
  return Math.round(value * 10) / 10;
}
