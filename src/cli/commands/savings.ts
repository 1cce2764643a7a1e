/** `mvledger savings`: avoided energy of the reporting readings against the baseline fit. */
import { analyseSavings, type BaselineAnalysis, type SavingsDocument } from '../../engine/index.js';
import { UsageError } from '../errors.js';
import type { SavingsCommandOptions } from '../options.js';
import { loadReadings, type ReadingsFile } from '../input/readings-file.js';
import { loadWeather, type WeatherFile } from '../input/weather-file.js';
import { toJsonDocument } from '../format/json.js';
import { renderSavingsReport } from '../format/savings-report.js';
import { fitBaseline, lineLookup } from './baseline.js';
import { explainTooFewPeriods } from './too-few-periods.js';

/** The command's whole stdout text; throws on bad input so nothing is printed halfway. */
export async function runSavings(options: SavingsCommandOptions): Promise<string> {
  const baselineReadings = await loadReadings(options.baseline);
  const reportingReadings = await loadReadings(options.reporting);
  const weather = await loadWeather(options.weather, options.unit);
  const baseline = fitBaseline(baselineReadings, weather, options);
  const model = options.model ?? baseline.choice.selected;
  const used = baseline.choice.candidates.find((c) => c.model === model);
  if (!used?.fit) {
    throw new UsageError(`--model ${model}: the ${model} shape could not be fitted to this baseline (${used?.reasons.join('; ') ?? 'not a candidate'})`);
  }
  const document = computeSavingsDocument(baseline, reportingReadings, weather, options, model);
  if (options.json) return toJsonDocument(document);
  return renderSavingsReport(document, {
    baselineFile: baselineReadings.file,
    reportingFile: reportingReadings.file,
    weatherFile: weather.file,
    weatherSource: weather.source,
    unit: weather.unit,
    selectedByFit: baseline.choice.selected,
    usedVerdict: used.verdict,
    baselineLineOf: lineLookup(baselineReadings),
    reportingLineOf: lineLookup(reportingReadings),
  });
}

function computeSavingsDocument(
  baseline: BaselineAnalysis,
  reporting: ReadingsFile,
  weather: WeatherFile,
  options: SavingsCommandOptions,
  model: NonNullable<SavingsCommandOptions['model']>,
): SavingsDocument {
  try {
    return analyseSavings(baseline, reporting.readings, weather.weather, { confidence: options.confidence, model, minCoverage: options.minCoverage });
  } catch (error) {
    if (error instanceof RangeError) {
      const explained = explainTooFewPeriods(reporting, weather, options.minCoverage, 1, error.message);
      if (explained) throw explained;
    }
    throw error;
  }
}
