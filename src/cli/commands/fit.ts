/** `mvledger fit`: fit every shape to the baseline readings and choose one. */
import { baselineSufficiency, filledDaysByPeriod } from '../../engine/index.js';
import type { FitOptions } from '../options.js';
import { loadReadings } from '../input/readings-file.js';
import { loadWeather } from '../input/weather-file.js';
import { toJsonDocument } from '../format/json.js';
import { renderFitReport } from '../format/fit-report.js';
import { fitBaseline, lineLookup } from './baseline.js';
import { checkExclusions, loadExclusions } from '../input/exclusions-file.js';
import { loadVariables } from '../input/variables-file.js';

/** The command's whole stdout text; throws on bad input so nothing is printed halfway. */
export async function runFit(options: FitOptions): Promise<string> {
  const readings = await loadReadings(options.readings);
  const weather = await loadWeather(options.weather, options.unit);
  const exclusions = options.exclusions === null ? null : await loadExclusions(options.exclusions);
  if (exclusions) checkExclusions(exclusions, readings.readings);
  const variables = options.variables === null ? null : await loadVariables(options.variables);
  const analysis = fitBaseline(readings, weather, options, exclusions?.exclusions ?? [], variables);
  if (options.json) return toJsonDocument(analysis.document);
  return renderFitReport(analysis.document, {
    readingsFile: readings.file,
    weatherFile: weather.file,
    weatherSource: weather.source,
    unit: weather.unit,
    minCoverage: options.minCoverage,
    lineOf: lineLookup(readings),
    sufficiency: baselineSufficiency(analysis.periods),
    weatherFills: filledDaysByPeriod(readings.readings, weather.filled),
    filledColumn: weather.filled.size > 0,
  });
}
