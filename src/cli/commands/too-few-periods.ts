/**
 * When the engine refuses to fit or to compute savings for want of usable
 * periods, say which file and which row is to blame. The engine states the
 * rule and carries the readings it left out and why.
 */
import type { TooFewPeriodsError } from '../../engine/index.js';
import { InputFileError } from '../errors.js';
import type { ReadingsFile } from '../input/readings-file.js';
import type { WeatherFile } from '../input/weather-file.js';

/** The engine's refusal as an InputFileError naming the file, the row and the reason. */
export function explainTooFewPeriods(
  readings: ReadingsFile,
  weather: WeatherFile,
  error: TooFewPeriodsError,
): InputFileError {
  const { excluded, message: engineMessage } = error;
  if (readings.readings.length === 0) {
    return new InputFileError(
      readings.file,
      readings.headerLine,
      'start',
      `no readings below the header; ${engineMessage}`,
    );
  }
  const first = excluded[0];
  if (first) {
    const others =
      excluded.length > 1
        ? ` (${excluded.length} periods in all are left out for want of weather in ${weather.file})`
        : ` (no weather for it in ${weather.file})`;
    return new InputFileError(
      readings.file,
      readings.lines[first.index] ?? readings.headerLine,
      'start',
      `${engineMessage}; this period is left out: ${first.reason}${others}`,
    );
  }
  const lastLine = readings.lines[readings.lines.length - 1] ?? readings.headerLine;
  return new InputFileError(
    readings.file,
    lastLine,
    'start',
    `${engineMessage}; the file has only ${readings.readings.length} reading${readings.readings.length === 1 ? '' : 's'}`,
  );
}
