/**
 * `mvledger fit --batch`: every meter of one readings file fitted in one
 * process, one CSV row (default) or one JSON line (--json) per meter, written
 * as each meter is done. The weather file is read and checked first, whole:
 * a problem in it stops the command before any output. A meter whose own
 * rows are bad, or that cannot be fitted, gets a row with status "error" and
 * the one-line reason, and the others go on; the exit code is then 2.
 * From MIN_METERS_FOR_THREADS meters on, the meters are fitted on the main
 * thread and worker threads together (fit-batch-threads.ts) and written in
 * the file's order all the same: the output does not depend on the number
 * of threads.
 */
import { availableParallelism } from 'node:os';
import { readCsvTable, requireColumns } from '../../lib/csv/csv-table.js';
import { InputFileError, UsageError } from '../errors.js';
import type { CliIO } from '../io.js';
import type { FitOptions } from '../options.js';
import { splitReadingsByMeter, splitWeatherByStation } from '../input/batch-files.js';
import { weatherFromTable, type WeatherFile } from '../input/weather-file.js';
import { BATCH_CSV_COLUMNS, fitMeter, withDayIndex, type MeterResult } from './fit-batch-meter.js';

export { BATCH_CSV_COLUMNS } from './fit-batch-meter.js';

/** What the batch did: meters fitted and meters that failed. */
export interface BatchOutcome {
  fitted: number;
  failed: number;
}

/** Fit every meter of the readings file, writing each result through `io` as it is made. */
export async function runFitBatch(options: FitOptions, io: CliIO, threads?: number): Promise<BatchOutcome> {
  const readingsTable = await readCsvTable(options.readings);
  requireColumns(readingsTable, ['meter', 'start', 'end', 'quantity']);
  const meters = splitReadingsByMeter(readingsTable);
  const weatherTables = splitWeatherByStation(await readCsvTable(options.weather));
  const weatherByStation = new Map<string | null, WeatherFile>();
  for (const [station, table] of weatherTables) weatherByStation.set(station, weatherFromTable(table, options.unit));
  for (const { meter, station } of meters) stationWeather(weatherByStation, station, meter, options);

  const outcome: BatchOutcome = { fitted: 0, failed: 0 };
  if (!options.json) io.stdout(`${BATCH_CSV_COLUMNS.join(',')}\r\n`);
  const write = (result: MeterResult) => {
    if (result.ok) outcome.fitted++;
    else outcome.failed++;
    io.stdout(result.line);
  };
  const workers = Math.min(threads ?? batchThreads(meters.length), meters.length);
  if (workers > 1) {
    const { fitInWorkers } = await import('./fit-batch-threads.js');
    await fitInWorkers(meters, weatherByStation, options, workers, write);
  } else {
    const indexed = new Map([...weatherByStation].map(([station, file]) => [station, withDayIndex(file)]));
    for (const item of meters)
      write(fitMeter(item, stationWeather(indexed, item.station, item.meter, options), options));
  }
  io.stderr(
    `mvledger: fitted ${outcome.fitted} of ${meters.length} meter(s)${outcome.failed > 0 ? `; ${outcome.failed} failed` : ''}\n`,
  );
  return outcome;
}

/** Fewest meters for which a batch starts worker threads (below it, starting them costs more than it saves). */
export const MIN_METERS_FOR_THREADS = 64;

/**
 * Threads for a batch of `meters`, the main thread counted: MVLEDGER_FIT_THREADS
 * when set (1 keeps everything on the main thread), else one per core up to
 * four from MIN_METERS_FOR_THREADS meters on.
 */
export function batchThreads(meters: number): number {
  const asked = process.env.MVLEDGER_FIT_THREADS;
  if (asked !== undefined && asked !== '') {
    const n = Number(asked);
    if (!Number.isInteger(n) || n < 1 || n > 64)
      throw new UsageError(`MVLEDGER_FIT_THREADS must be a whole number from 1 to 64, got ${JSON.stringify(asked)}`);
    return n;
  }
  return meters < MIN_METERS_FOR_THREADS ? 1 : Math.min(4, availableParallelism());
}

export function stationWeather(
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
