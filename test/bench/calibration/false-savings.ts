/**
 * Experiment A: false savings and band coverage. Invented buildings
 * (heating-dominated, cooling-dominated and 5P) in each invented climate,
 * billed in 28–33-day bills over two baseline years and one reporting year
 * with no retrofit, so the true saving is 0. Per group and form: the mean
 * false saving as a share of the adjusted baseline with its standard error,
 * and how often the 68% and 90% bands (exact and Guideline 14) cover zero.
 * The same meters again without noise show the model-form error alone.
 *
 * No kind-and-climate combination is skipped: a building whose changepoint
 * its climate seldom reaches (heating-dominated in the hot climate,
 * cooling-dominated in the cold one) is still a meter a contract may hold,
 * and the shapes chosen show what its bills let the engine see.
 */
import { MODEL_NAMES, type ModelName } from '../../../src/engine/index.js';
import {
  ARCHETYPE_LABELS,
  INVENTED_CLIMATES,
  TWO_YEARS_THEN_ONE,
  deriveSeed,
  simulateMeterStudy,
  type Archetype,
  type ClimateName,
} from '../../support/simulation/index.js';
import { FORMS, baselineInForm, savingsAt, type TemperatureForm } from '../../support/temperature-forms.js';
import type { NoiseLevel } from './noise-levels.js';
import { maxAbs, meanWithError, share } from './tallies.js';

export interface FalseSavingsSettings {
  seed: number;
  metersPerGroup: number;
  archetypes: readonly Archetype[];
  climates: readonly ClimateName[];
  noiseLevels: readonly NoiseLevel[];
}

/** One meter-year in one form. */
interface MeterYear {
  falseSaving: number;
  covers: { exact68: boolean; guideline68: boolean; exact90: boolean; guideline90: boolean };
  selected: ModelName;
}

export interface FalseSavingsRow {
  group: string;
  archetype: Archetype;
  climate: ClimateName;
  noise: string;
  form: TemperatureForm;
  meters: number;
  /** Meters whose baseline could not be analysed (left out of the figures). */
  failed: number;
  /** Mean of savings / adjusted baseline over the meters (truth 0). */
  meanFalseSaving: number;
  standardError: number;
  /** Share of meter-years whose band covers zero. */
  coverage: { exact68: number; guideline68: number; exact90: number; guideline90: number };
  /** How many meters selected each shape. */
  selected: Partial<Record<ModelName, number>>;
}

export interface ModelFormRow {
  group: string;
  archetype: Archetype;
  climate: ClimateName;
  form: TemperatureForm;
  meters: number;
  failed: number;
  meanFalseSaving: number;
  maxAbsFalseSaving: number;
}

const CONFIDENCES = [0.68, 0.9] as const;

function meterYear(
  archetype: Archetype,
  climate: ClimateName,
  noise: { persistence: number; scale?: number },
  seed: number,
  form: TemperatureForm,
): MeterYear | null {
  const study = simulateMeterStudy({
    archetype,
    climate: INVENTED_CLIMATES[climate],
    noise,
    design: TWO_YEARS_THEN_ONE,
    seed,
  });
  let analysis;
  try {
    analysis = baselineInForm(study.baseline, study.weather, form);
  } catch (error) {
    if (error instanceof RangeError) return null;
    throw error;
  }
  const [at68, at90] = savingsAt(analysis, study.reporting, study.weather, CONFIDENCES);
  const covers = (doc: typeof at68, formula: 'exact' | 'guideline14') =>
    Math.abs(doc!.totals.savings) <= doc!.totals.uncertainty[formula].absolute;
  return {
    falseSaving: at68!.totals.fractionSaved,
    covers: {
      exact68: covers(at68, 'exact'),
      guideline68: covers(at68, 'guideline14'),
      exact90: covers(at90, 'exact'),
      guideline90: covers(at90, 'guideline14'),
    },
    selected: analysis.choice.selected,
  };
}

function tallyShapes(years: readonly MeterYear[]): Partial<Record<ModelName, number>> {
  const counts: Partial<Record<ModelName, number>> = {};
  for (const model of MODEL_NAMES) {
    const count = years.filter((y) => y.selected === model).length;
    if (count > 0) counts[model] = count;
  }
  return counts;
}

/** The noisy runs: one row per group, noise level and form. */
export function falseSavingsAndCoverage(settings: FalseSavingsSettings): FalseSavingsRow[] {
  const rows: FalseSavingsRow[] = [];
  settings.archetypes.forEach((archetype, a) => {
    settings.climates.forEach((climate, c) => {
      for (const noise of settings.noiseLevels) {
        for (const form of FORMS) {
          const results = Array.from({ length: settings.metersPerGroup }, (_, i) =>
            meterYear(archetype, climate, { persistence: noise.persistence }, deriveSeed(settings.seed, a, c, i), form),
          );
          const years = results.filter((y): y is MeterYear => y !== null);
          const { mean, standardError } = meanWithError(years.map((y) => y.falseSaving));
          rows.push({
            group: `${ARCHETYPE_LABELS[archetype]} · ${climate}`,
            archetype,
            climate,
            noise: noise.label,
            form,
            meters: years.length,
            failed: results.length - years.length,
            meanFalseSaving: mean,
            standardError,
            coverage: {
              exact68: share(years, (y) => y.covers.exact68),
              guideline68: share(years, (y) => y.covers.guideline68),
              exact90: share(years, (y) => y.covers.exact90),
              guideline90: share(years, (y) => y.covers.guideline90),
            },
            selected: tallyShapes(years),
          });
        }
      }
    });
  });
  return rows;
}

/** The same meters (same seeds, plan, weather and buildings) with the noise removed: the model-form error alone. */
export function modelFormError(settings: FalseSavingsSettings): ModelFormRow[] {
  const rows: ModelFormRow[] = [];
  settings.archetypes.forEach((archetype, a) => {
    settings.climates.forEach((climate, c) => {
      for (const form of FORMS) {
        const results = Array.from({ length: settings.metersPerGroup }, (_, i) =>
          meterYear(archetype, climate, { persistence: 0, scale: 0 }, deriveSeed(settings.seed, a, c, i), form),
        );
        const years = results.filter((y): y is MeterYear => y !== null);
        const values = years.map((y) => y.falseSaving);
        rows.push({
          group: `${ARCHETYPE_LABELS[archetype]} · ${climate}`,
          archetype,
          climate,
          form,
          meters: years.length,
          failed: results.length - years.length,
          meanFalseSaving: meanWithError(values).mean,
          maxAbsFalseSaving: maxAbs(values),
        });
      }
    });
  });
  return rows;
}

/**
 * All groups of one noise level and form together: meter-weighted mean
 * false saving (its standard error from the groups') and coverage.
 */
export function pooledRows(rows: readonly FalseSavingsRow[]): Omit<FalseSavingsRow, 'archetype' | 'climate'>[] {
  const keys = [...new Set(rows.map((r) => `${r.noise}|${r.form}`))];
  return keys.map((key) => {
    const part = rows.filter((r) => `${r.noise}|${r.form}` === key);
    const meters = part.reduce((sum, r) => sum + r.meters, 0);
    const weighted = (value: (r: FalseSavingsRow) => number): number =>
      part.reduce((sum, r) => sum + r.meters * value(r), 0) / meters;
    const selected: Partial<Record<ModelName, number>> = {};
    for (const r of part)
      for (const [model, count] of Object.entries(r.selected) as [ModelName, number][])
        selected[model] = (selected[model] ?? 0) + count;
    return {
      group: 'all groups',
      noise: part[0]!.noise,
      form: part[0]!.form,
      meters,
      failed: part.reduce((sum, r) => sum + r.failed, 0),
      meanFalseSaving: weighted((r) => r.meanFalseSaving),
      standardError: Math.sqrt(part.reduce((sum, r) => sum + (r.meters * r.standardError) ** 2, 0)) / meters,
      coverage: {
        exact68: weighted((r) => r.coverage.exact68),
        guideline68: weighted((r) => r.coverage.guideline68),
        exact90: weighted((r) => r.coverage.exact90),
        guideline90: weighted((r) => r.coverage.guideline90),
      },
      selected,
    };
  });
}
