/** One meter of a batch fit: its output line (a CSV row or a JSON line), on the main thread or a worker thread. */
import { DayIndexedWeather, type BaselineAnalysis, type FitDocument } from '../../engine/index.js';
import { csvNumber, csvText } from '../../reports/csv.js';
import { InputFileError, oneLine } from '../errors.js';
import type { MeterTable } from '../input/batch-files.js';
import { readingsFromTable } from '../input/readings-file.js';
import type { WeatherFile } from '../input/weather-file.js';
import type { FitOptions } from '../options.js';
import { fitBaseline } from './baseline.js';

/** A weather file with its days indexed once for every meter of a batch that uses it (each thread builds its own). */
export function withDayIndex(file: WeatherFile): WeatherFile {
  return { ...file, indexed: new DayIndexedWeather(file.weather) };
}

/** The CSV columns of a batch fit, one row per meter. Columns are only ever added at the end. */
export const BATCH_CSV_COLUMNS = [
  'meter',
  'station',
  'status',
  'model',
  'temperature_form',
  'periods_used',
  'periods_excluded',
  'r2',
  'cvrmse',
  'nmbe',
  'guideline14',
  'parameters',
  'error',
] as const;

/** One meter's output line, and whether it was fitted. */
export interface MeterResult {
  ok: boolean;
  line: string;
}

/** Fit one meter of the batch: its line, or its error line when its rows are bad or it cannot be fitted (anything else is thrown). */
export function fitMeter(item: MeterTable, weather: WeatherFile, options: FitOptions): MeterResult {
  const { meter, station, table } = item;
  try {
    const readings = readingsFromTable(table);
    const analysis = fitBaseline(readings, weather, options);
    return {
      ok: true,
      line: options.json ? jsonLine(meter, station, analysis) : csvRow(meter, station, analysis.document),
    };
  } catch (error) {
    if (!(error instanceof InputFileError || error instanceof RangeError)) throw error;
    const message = oneLine(error.message);
    return {
      ok: false,
      line: options.json
        ? `${JSON.stringify({ meter, station, status: 'error', error: message })}\n`
        : csvErrorRow(meter, station, message),
    };
  }
}

function jsonLine(meter: string, station: string | null, analysis: BaselineAnalysis): string {
  const record = { meter, station, status: 'ok', fit: analysis.document };
  return `${JSON.stringify(record, (_key, value: unknown) => (typeof value === 'number' && !Number.isFinite(value) ? null : value))}\n`;
}

function csvRow(meter: string, station: string | null, document: FitDocument): string {
  const selected = document.candidates.find((c) => c.model === document.selected);
  const stats = selected?.stats ?? null;
  const g14 = selected?.guideline14 ?? null;
  const parameters = Object.entries(selected?.parameters ?? {})
    .map(([name, value]) => `${name}=${csvNumber(value)}`)
    .join(';');
  const cells = [
    csvText(meter),
    station === null ? '' : csvText(station),
    'ok',
    document.selected,
    document.temperatureForm,
    String(document.periods.used),
    String(document.periods.excluded.length),
    stats ? csvNumber(stats.r2) : '',
    stats ? csvNumber(stats.cvrmse) : '',
    stats ? csvNumber(stats.nmbe) : '',
    g14 === null ? '' : g14.pass ? 'pass' : 'fail',
    csvText(parameters),
    '',
  ];
  return `${cells.join(',')}\r\n`;
}

function csvErrorRow(meter: string, station: string | null, message: string): string {
  const cells = BATCH_CSV_COLUMNS.map((column) =>
    column === 'meter'
      ? csvText(meter)
      : column === 'station'
        ? station === null
          ? ''
          : csvText(station)
        : column === 'status'
          ? 'error'
          : column === 'error'
            ? csvText(message)
            : '',
  );
  return `${cells.join(',')}\r\n`;
}
