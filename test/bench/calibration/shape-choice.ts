/**
 * Experiment B: does the shape choice hold its error rate?
 *   1. Weather-free meters (no weather dependence at all): how often the
 *      whole procedure picks a weather shape, and how often each single
 *      extra-sum-of-squares F-test of a weather shape against the flat model
 *      (1P) passes at the engine's level α, whatever screening said. Daily
 *      data (one and two years) and 24–36 bills; independent days and AR(1)
 *      noise.
 *   2. True-shape recovery: true 3PH, 3PC and 5P buildings, two years of
 *      bills in the continental climate, whose bills span every segment of
 *      the true shape (at least the engine's minimum points per segment on
 *      each side of each true changepoint; meters that do not are left out
 *      and counted): recovered, over-fitted (a shape with more parameters),
 *      under-fitted (fewer), or another shape of the same size.
 *   3. The time to choose among all six shapes for 36 bills.
 */
import {
  DEFAULT_MIN_POINTS_PER_SEGMENT,
  DEFAULT_SIGNIFICANCE_LEVEL,
  MODEL_NAMES,
  PARAMETER_COUNT,
  alignPeriods,
  nestedFTest,
  type BaselineAnalysis,
  type ModelName,
} from '../../../src/engine/index.js';
import {
  CLIMATE_NAMES,
  INVENTED_CLIMATES,
  TRUE_SHAPE,
  deriveSeed,
  simulateMeterStudy,
  type Archetype,
  type ClimateName,
  type MeterStudy,
  type StudyDesign,
} from '../../support/simulation/index.js';
import { FORMS, baselineInForm, type TemperatureForm } from '../../support/temperature-forms.js';
import type { NoiseLevel } from './noise-levels.js';
import { median, timeEach } from '../timing.js';
import { share } from './tallies.js';

/** The weather shapes, each tested against 1P on its own. */
export const WEATHER_SHAPES: readonly ModelName[] = MODEL_NAMES.filter((m) => m !== '1P');

export interface WeatherFreeData {
  label: string;
  /** The design of meter i (the bill count may vary with i). */
  design(i: number): StudyDesign;
  /** One-day readings: both forms are the same fit, so one is run. */
  daily: boolean;
}

export const WEATHER_FREE_DATA: readonly WeatherFreeData[] = [
  { label: 'daily, 1 year (365 readings)', design: () => ({ baseline: { days: 365 }, reporting: null }), daily: true },
  { label: 'daily, 2 years (730 readings)', design: () => ({ baseline: { days: 730 }, reporting: null }), daily: true },
  // 24 to 36 bills, evenly over the meters.
  {
    label: 'bills, 24–36 of 28–33 days',
    design: (i) => ({ baseline: { bills: 24 + (i % 13) }, reporting: null }),
    daily: false,
  },
];

export interface WeatherFreeRow {
  data: string;
  noise: string;
  /** 'mean', 'daily', or 'both' for one-day readings (the forms coincide there). */
  form: TemperatureForm | 'both';
  meters: number;
  /** Share of meters whose choice is any weather shape (not 1P). */
  anyWeatherShape: number;
  /** Per weather shape: share of meters whose F-test against 1P passes at α. */
  fTestPasses: Partial<Record<ModelName, number>>;
  /** How many meters selected each shape. */
  selected: Partial<Record<ModelName, number>>;
}

/** F-test of each weather shape against the flat model (a shape that could not be fitted does not pass). */
function fTestsAgainstFlat(analysis: BaselineAnalysis, alpha: number): Partial<Record<ModelName, boolean>> {
  const flat = analysis.choice.candidates.find((c) => c.model === '1P')?.fit;
  const passes: Partial<Record<ModelName, boolean>> = {};
  for (const model of WEATHER_SHAPES) {
    const fit = analysis.choice.candidates.find((c) => c.model === model)?.fit;
    passes[model] = Boolean(flat && fit && nestedFTest(flat, fit, alpha).passes);
  }
  return passes;
}

function countSelected(models: readonly ModelName[]): Partial<Record<ModelName, number>> {
  const counts: Partial<Record<ModelName, number>> = {};
  for (const model of models) counts[model] = (counts[model] ?? 0) + 1;
  return counts;
}

export interface WeatherFreeSettings {
  seed: number;
  meters: { daily: number; bills: number };
  noiseLevels: readonly NoiseLevel[];
}

/** Weather-free meters, climates in turn (mild, continental, cold, hot, …). */
export function weatherFreeChoice(settings: WeatherFreeSettings): WeatherFreeRow[] {
  const rows: WeatherFreeRow[] = [];
  WEATHER_FREE_DATA.forEach((data, d) => {
    settings.noiseLevels.forEach((noise, k) => {
      const count = data.daily ? settings.meters.daily : settings.meters.bills;
      const studies: MeterStudy[] = Array.from({ length: count }, (_, i) =>
        simulateMeterStudy({
          archetype: 'weatherFree',
          climate: INVENTED_CLIMATES[CLIMATE_NAMES[i % CLIMATE_NAMES.length]!],
          noise: { persistence: noise.persistence },
          design: data.design(i),
          seed: deriveSeed(settings.seed, d, k, i),
        }),
      );
      const forms: readonly (TemperatureForm | 'both')[] = data.daily ? ['both'] : FORMS;
      for (const form of forms) {
        const analyses = studies.map((study) =>
          baselineInForm(study.baseline, study.weather, form === 'both' ? 'daily' : form),
        );
        const tests = analyses.map((analysis) => fTestsAgainstFlat(analysis, DEFAULT_SIGNIFICANCE_LEVEL));
        const fTestPasses: Partial<Record<ModelName, number>> = {};
        for (const model of WEATHER_SHAPES) fTestPasses[model] = share(tests, (t) => t[model] === true);
        rows.push({
          data: data.label,
          noise: noise.label,
          form,
          meters: count,
          anyWeatherShape: share(analyses, (a) => a.choice.selected !== '1P'),
          fTestPasses,
          selected: countSelected(analyses.map((a) => a.choice.selected)),
        });
      }
    });
  });
  return rows;
}

export interface RecoveryRow {
  truth: ModelName;
  noise: string;
  form: TemperatureForm;
  /** Meters whose bills span every segment of the true shape (the rest are left out). */
  meters: number;
  leftOut: number;
  recovered: number;
  overFitted: number;
  underFitted: number;
  /** Another shape with as many parameters (3PC for a true 3PH, say). */
  otherSameSize: number;
  selected: Partial<Record<ModelName, number>>;
}

export interface RecoverySettings {
  seed: number;
  metersPerTruth: number;
  noiseLevels: readonly NoiseLevel[];
  climate: ClimateName;
}

/** Bills on each side of each true changepoint, by the bill's mean temperature. */
function spansTrueShape(study: MeterStudy, minPoints: number): boolean {
  const { periods } = alignPeriods(study.baseline, study.weather);
  const b = study.building;
  const count = (test: (t: number) => boolean): number => periods.filter((p) => test(p.meanTemp)).length;
  switch (b.archetype) {
    case 'heating':
      return count((t) => t <= b.heatingBelow) >= minPoints && count((t) => t >= b.heatingBelow) >= minPoints;
    case 'cooling':
      return count((t) => t <= b.coolingAbove) >= minPoints && count((t) => t >= b.coolingAbove) >= minPoints;
    case 'fivePoint':
      return (
        count((t) => t <= b.heatingBelow) >= minPoints &&
        count((t) => t >= b.heatingBelow && t <= b.coolingAbove) >= minPoints &&
        count((t) => t >= b.coolingAbove) >= minPoints
      );
    case 'weatherFree':
      return true;
  }
}

const RECOVERY_ARCHETYPES: readonly Archetype[] = ['heating', 'cooling', 'fivePoint'];

/** True 3PH, 3PC and 5P buildings, two years of bills each. */
export function trueShapeRecovery(settings: RecoverySettings): RecoveryRow[] {
  const rows: RecoveryRow[] = [];
  RECOVERY_ARCHETYPES.forEach((archetype, a) => {
    const truth = TRUE_SHAPE[archetype];
    settings.noiseLevels.forEach((noise, k) => {
      const all = Array.from({ length: settings.metersPerTruth }, (_, i) =>
        simulateMeterStudy({
          archetype,
          climate: INVENTED_CLIMATES[settings.climate],
          noise: { persistence: noise.persistence },
          design: { baseline: { bills: 24 }, reporting: null },
          seed: deriveSeed(settings.seed, a, k, i),
        }),
      );
      const studies = all.filter((study) => spansTrueShape(study, DEFAULT_MIN_POINTS_PER_SEGMENT));
      for (const form of FORMS) {
        const selected = studies.map((study) => baselineInForm(study.baseline, study.weather, form).choice.selected);
        const p = PARAMETER_COUNT[truth];
        rows.push({
          truth,
          noise: noise.label,
          form,
          meters: studies.length,
          leftOut: all.length - studies.length,
          recovered: share(selected, (m) => m === truth),
          overFitted: share(selected, (m) => PARAMETER_COUNT[m] > p),
          underFitted: share(selected, (m) => PARAMETER_COUNT[m] < p),
          otherSameSize: share(selected, (m) => m !== truth && PARAMETER_COUNT[m] === p),
          selected: countSelected(selected),
        });
      }
    });
  });
  return rows;
}

export interface ChoiceTimingRow {
  form: TemperatureForm;
  bills: number;
  meters: number;
  runs: number;
  medianMs: number;
}

/**
 * Median time of analyseBaseline (aligning 36 bills with ~1,100 days of
 * weather, fitting all six shapes, choosing) in each form, over a few
 * invented 5P meters in the continental climate, each timed call on its own.
 */
export function choiceTiming(settings: {
  seed: number;
  meters: number;
  runsPerMeter: number;
  warmUp: number;
}): ChoiceTimingRow[] {
  const studies = Array.from({ length: settings.meters }, (_, i) =>
    simulateMeterStudy({
      archetype: 'fivePoint',
      climate: INVENTED_CLIMATES.continental,
      noise: { persistence: 0 },
      design: { baseline: { bills: 36 }, reporting: null },
      seed: deriveSeed(settings.seed, i),
    }),
  );
  return FORMS.map((form) => {
    const times = studies.flatMap((study) =>
      timeEach(() => baselineInForm(study.baseline, study.weather, form), settings.runsPerMeter, settings.warmUp),
    );
    return { form, bills: 36, meters: studies.length, runs: times.length, medianMs: median(times) };
  });
}
