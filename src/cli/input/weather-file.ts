/**
 * Daily weather from CSV: columns date and temp, or date, tmin and tmax
 * (daily mean = (tmin + tmax) / 2, common practice). All temperatures are in
 * the station's unit. An empty temperature cell is a missing day: the
 * engine's coverage rule decides whether the periods around it stay usable.
 * An optional column `filled` names a day filled on record (interpolation or
 * second-station, as the service lists them; empty for an observed day), so
 * `fit` can say which periods rest on filled days.
 */
import {
  checkWeather,
  FILL_METHODS,
  isIsoDate,
  type DailyTemperature,
  type DayIndexedWeather,
  type FillMethod,
  type TemperatureUnit,
} from '../../engine/index.js';
import { cell, readCsvTable, requireColumns, type CsvRow, type CsvTable } from '../../lib/csv/csv-table.js';
import { parseNumberCell } from '../../lib/csv/cells.js';
import { locateProblems, throwFirstProblem, type LocatedProblem } from './problems.js';

export interface WeatherFile {
  file: string;
  unit: TemperatureUnit;
  /** How the daily mean was read. */
  source: 'temp' | 'tmin/tmax';
  weather: DailyTemperature[];
  /** Line in the file of each day, by index. */
  lines: number[];
  /** Days the file's `filled` column marks as filled on record, by method (empty without the column). */
  filled: Map<string, FillMethod>;
  /** The days indexed once, where many meters are fitted against this file (a batch); built in each thread. */
  indexed?: DayIndexedWeather;
}

export async function loadWeather(file: string, unit: TemperatureUnit): Promise<WeatherFile> {
  return weatherFromTable(await readCsvTable(file), unit);
}

export function weatherFromTable(table: CsvTable, unit: TemperatureUnit): WeatherFile {
  requireColumns(table, ['date']);
  const hasMean = table.columns.includes('temp');
  if (!hasMean && !table.columns.includes('tmin') && !table.columns.includes('tmax')) requireColumns(table, ['temp']);
  const temperatureColumns = hasMean ? ['temp'] : ['tmin', 'tmax'];
  requireColumns(table, temperatureColumns);

  const problems: LocatedProblem[] = [];
  const days: { date: string; values: number[]; line: number }[] = [];
  for (const row of table.rows) {
    const date = cell(row, 'date');
    const values = readTemperatures(row, temperatureColumns, problems);
    if (values) days.push({ date, values, line: row.line });
    else if (!isIsoDate(date))
      problems.push({
        line: row.line,
        field: 'date',
        message: `not a valid date (YYYY-MM-DD): ${JSON.stringify(date)}`,
      });
  }
  const lines = days.map((d) => d.line);
  // The engine's plausibility check runs on each column as read, so a problem names that column.
  temperatureColumns.forEach((column, k) => {
    const series = days.map((d) => ({ date: d.date, temp: d.values[k]! }));
    problems.push(...locateProblems(checkWeather(series, unit), lines, (field) => (field === 'temp' ? column : field)));
  });
  if (!hasMean) {
    for (const day of days) {
      const [tmin, tmax] = day.values as [number, number];
      if (tmin > tmax) problems.push({ line: day.line, field: 'tmin', message: `tmin ${tmin} is above tmax ${tmax}` });
    }
  }
  const filled = new Map<string, FillMethod>();
  if (table.columns.includes('filled')) {
    for (const row of table.rows) {
      const method = cell(row, 'filled');
      if (method === '') continue;
      if (!(FILL_METHODS as readonly string[]).includes(method)) {
        problems.push({
          line: row.line,
          field: 'filled',
          message: `must be empty, ${FILL_METHODS.join(' or ')}, got ${JSON.stringify(method)}`,
        });
      } else filled.set(cell(row, 'date'), method as FillMethod);
    }
  }
  throwFirstProblem(table.file, problems, ['date', ...temperatureColumns, 'filled']);

  const weather = days.map((d) => ({ date: d.date, temp: hasMean ? d.values[0]! : (d.values[0]! + d.values[1]!) / 2 }));
  return { file: table.file, unit, source: hasMean ? 'temp' : 'tmin/tmax', weather, lines, filled };
}

/** The row's temperatures, or null for a missing day (an empty temperature cell). */
function readTemperatures(row: CsvRow, columns: readonly string[], problems: LocatedProblem[]): number[] | null {
  const texts = columns.map((column) => cell(row, column));
  if (texts.some((text) => text === '')) return null;
  return texts.map((text, k) => {
    const parsed = parseNumberCell(text);
    if (parsed.ok) return parsed.value;
    problems.push({ line: row.line, field: columns[k]!, message: parsed.message });
    return Number.NaN;
  });
}
