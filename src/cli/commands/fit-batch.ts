/**
 * `mvledger fit --batch`: every meter of one readings file fitted in one
 * process, one CSV row (default) or one JSON line (--json) per meter, written
 * as each meter is done. The weather file is read and checked first, whole:
 * a problem in it stops the command before any output. A meter whose own
 * rows are bad, or that cannot be fitted, gets a row with status "error" and
 * the one-line reason, and the others go on; the exit code is then 2.
 */
import type { BaselineAnalysis, FitDocument } from '../../engine/index.js';
import { readCsvTable, requireColumns } from '../../lib/csv/csv-table.js';
import { csvNumber, csvText } from '../../reports/csv.js';
import { InputFileError, UsageError, oneLine } from '../errors.js';
import type { CliIO } from '../io.js';
import type { FitOptions } from '../options.js';
import { splitReadingsByMeter, splitWeatherByStation } from '../input/batch-files.js';
import { readingsFromTable } from '../input/readings-file.js';
import { weatherFromTable, type WeatherFile } from '../input/weather-file.js';
import { fitBaseline } from './baseline.js';

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

/** What the batch did: meters fitted and meters that failed. */
export interface BatchOutcome {
  fitted: number;
  failed: number;
}

/** Fit every meter of the readings file, writing each result through `io` as it is made. */
export async function runFitBatch(options: FitOptions, io: CliIO): Promise<BatchOutcome> {
  const readingsTable = await readCsvTable(options.readings);
  requireColumns(readingsTable, ['meter', 'start', 'end', 'quantity']);
  const meters = splitReadingsByMeter(readingsTable);
  const weatherTables = splitWeatherByStation(await readCsvTable(options.weather));
  const weatherByStation = new Map<string | null, WeatherFile>();
  for (const [station, table] of weatherTables) weatherByStation.set(station, weatherFromTable(table, options.unit));
  for (const { meter, station } of meters) stationWeather(weatherByStation, station, meter, options);

  const outcome: BatchOutcome = { fitted: 0, failed: 0 };
  if (!options.json) io.stdout(`${BATCH_CSV_COLUMNS.join(',')}\r\n`);
  for (const { meter, station, table } of meters) {
    let line: string;
    try {
      const readings = readingsFromTable(table);
      const analysis = fitBaseline(readings, stationWeather(weatherByStation, station, meter, options), options);
      line = options.json ? jsonLine(meter, station, analysis) : csvRow(meter, station, analysis.document);
      outcome.fitted++;
    } catch (error) {
      if (!(error instanceof InputFileError || error instanceof RangeError)) throw error;
      const message = oneLine(error.message);
      line = options.json
        ? `${JSON.stringify({ meter, station, status: 'error', error: message })}\n`
        : csvErrorRow(meter, station, message);
      outcome.failed++;
    }
    io.stdout(line);
  }
  io.stderr(`mvledger: fitted ${outcome.fitted} of ${meters.length} meter(s)${outcome.failed > 0 ? `; ${outcome.failed} failed` : ''}\n`);
  return outcome;
}

function stationWeather(
  weather: ReadonlyMap<string | null, WeatherFile>,
  station: string | null,
  meter: string,
  options: FitOptions,
): WeatherFile {
  if (station === null) {
    const all = weather.get(null);
    if (all) return all;
    throw new UsageError(
      `${options.weather} has a station column: give the readings a station column too (meter ${JSON.stringify(meter)} names none)`,
    );
  }
  const own = weather.get(station) ?? weather.get(null);
  if (own) return own;
  throw new InputFileError(
    options.weather,
    null,
    'station',
    `no weather for station ${JSON.stringify(station)} (meter ${JSON.stringify(meter)})`,
  );
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
