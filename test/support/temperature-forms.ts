/**
 * The two temperature forms of a billed baseline, side by side:
 *   - 'mean': each bill fitted against its mean temperature (the form the
 *     engine has used so far);
 *   - 'daily': each bill fitted against the mean over its own days of the
 *     daily changepoint response (the day-resolved, variable-base degree-day
 *     form).
 * The form is passed to analyseBaseline as the option `temperatureForm`;
 * an engine that does not know the option ignores it, and then both columns
 * are the same (detectFormSupport says so). The savings projection follows
 * the fit's own form.
 */
import {
  analyseBaseline,
  analyseSavings,
  type BaselineAnalysis,
  type BaselineOptions,
  type DailyTemperature,
  type Reading,
  type SavingsDocument,
  type ShapeFit,
} from '../../src/engine/index.js';

export type TemperatureForm = 'mean' | 'daily';

/** Both forms, the engine's old one first. */
export const FORMS: readonly TemperatureForm[] = ['mean', 'daily'];

/** Baseline options with the form; typed apart so this compiles before and after the engine knows it. */
export type FormOptions = BaselineOptions & { temperatureForm?: TemperatureForm };

/** analyseBaseline in the given form. */
export function baselineInForm(
  readings: readonly Reading[],
  weather: readonly DailyTemperature[],
  form: TemperatureForm,
  options: BaselineOptions = {},
): BaselineAnalysis {
  const withForm: FormOptions = { ...options, temperatureForm: form };
  return analyseBaseline(readings, weather, withForm);
}

/** The selected shape's fit of an analysis. */
export function selectedFit(analysis: BaselineAnalysis): ShapeFit {
  const fit = analysis.choice.candidates.find((c) => c.model === analysis.choice.selected)?.fit;
  if (!fit) throw new Error(`the selected shape ${analysis.choice.selected} has no fit`);
  return fit;
}

/** Savings at the given confidences (the projection follows the fit's own form). */
export function savingsAt(
  analysis: BaselineAnalysis,
  reporting: readonly Reading[],
  weather: readonly DailyTemperature[],
  confidences: readonly number[],
): SavingsDocument[] {
  return confidences.map((confidence) => analyseSavings(analysis, reporting, weather, { confidence }));
}

/**
 * Whether the engine honours `temperatureForm`: fit one billed baseline in
 * both forms and compare the selected fits' SSE and coefficients.
 */
export function detectFormSupport(readings: readonly Reading[], weather: readonly DailyTemperature[]): boolean {
  const [mean, daily] = FORMS.map((form) => selectedFit(baselineInForm(readings, weather, form)));
  return (
    mean!.sse !== daily!.sse ||
    mean!.model !== daily!.model ||
    mean!.rawCoefficients.some((value, j) => value !== daily!.rawCoefficients[j])
  );
}
