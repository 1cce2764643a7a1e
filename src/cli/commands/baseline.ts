/** The baseline analysis both commands start from, with too-few-periods turned into an input error. */
import {
  analyseBaseline,
  MissingVariableValuesError,
  TooFewPeriodsError,
  type BaselineAnalysis,
  type Exclusion,
} from '../../engine/index.js';
import { explainMissingValues, type VariablesFile } from '../input/variables-file.js';
import type { CommonOptions } from '../options.js';
import type { ReadingsFile } from '../input/readings-file.js';
import type { WeatherFile } from '../input/weather-file.js';
import { explainTooFewPeriods } from './too-few-periods.js';

export function fitBaseline(
  readings: ReadingsFile,
  weather: WeatherFile,
  options: CommonOptions,
  exclusions: readonly Exclusion[] = [],
  variables: VariablesFile | null = null,
): BaselineAnalysis {
  try {
    return analyseBaseline(readings.readings, weather.indexed ?? weather.weather, {
      exclusions,
      ...(variables ? { variableSeries: variables.series, variables: variables.series.map((s) => s.name) } : {}),
      minCoverage: options.minCoverage,
      significanceLevel: options.significanceLevel,
      minPointsPerSegment: options.minPointsPerSegment,
      ...(options.temperatureForm === null ? {} : { temperatureForm: options.temperatureForm }),
    });
  } catch (error) {
    if (error instanceof MissingVariableValuesError)
      throw explainMissingValues(error, variables, `baseline readings ${readings.file}`);
    throw error instanceof TooFewPeriodsError ? explainTooFewPeriods(readings, weather, error) : error;
  }
}

/** File line of a reading by index, for the reports. */
export function lineLookup(readings: ReadingsFile): (index: number) => number {
  return (index) => readings.lines[index] ?? readings.headerLine;
}
