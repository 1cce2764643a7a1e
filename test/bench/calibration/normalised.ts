/**
 * Experiment D: normalised savings with no retrofit. The baseline model and
 * a reporting-year model, both applied to the climate's invented normal
 * year (its seasonal curve, day by day), should agree when nothing changed:
 * count how often |normalised savings| exceeds 2% of the normal-year
 * baseline use, for electric-like meters (cooling-dominated and 5P) and
 * gas-like meters (heating-dominated), climates in turn; and how often the
 * stated band of the normalised saving (at 68% and 90%) covers the true 0.
 */
import { normalisedSavings } from '../../../src/engine/index.js';
import {
  CLIMATE_NAMES,
  INVENTED_CLIMATES,
  TWO_YEARS_THEN_ONE,
  deriveSeed,
  normalYearTemperatures,
  simulateMeterStudy,
  type Archetype,
} from '../../support/simulation/index.js';
import { FORMS, baselineInForm, selectedFit, type TemperatureForm } from '../../support/temperature-forms.js';
import type { NoiseLevel } from './noise-levels.js';
import { meanWithError, share } from './tallies.js';

export const NORMALISED_THRESHOLD = 0.02;

const CLASSES: readonly { label: string; archetypes: readonly Archetype[] }[] = [
  { label: 'electric-like', archetypes: ['cooling', 'fivePoint'] },
  { label: 'gas-like', archetypes: ['heating'] },
];

export interface NormalisedRow {
  meterClass: string;
  noise: string;
  form: TemperatureForm;
  meters: number;
  /** Meters for which normalised savings were available. */
  available: number;
  /** Share of available meters with |normalised fraction saved| > 2%. */
  beyondThreshold: number;
  meanFraction: number;
  standardError: number;
  /** Share of available meters whose normalised-savings band covers 0, at 68% and 90%. */
  covers68: number;
  covers90: number;
}

export interface NormalisedSettings {
  seed: number;
  metersPerClass: number;
  noiseLevels: readonly NoiseLevel[];
}

/** Options for normalisedSavings with the form; ignored by an engine that does not know it. */
type NormalisedOptions = { minCoverage?: number; confidence?: number } & { temperatureForm?: TemperatureForm };

export function normalisedWithoutRetrofit(settings: NormalisedSettings): NormalisedRow[] {
  const rows: NormalisedRow[] = [];
  CLASSES.forEach((meterClass, c) => {
    settings.noiseLevels.forEach((noise, k) => {
      const studies = Array.from({ length: settings.metersPerClass }, (_, i) => {
        const climateName = CLIMATE_NAMES[i % CLIMATE_NAMES.length]!;
        const archetype = meterClass.archetypes[Math.floor(i / CLIMATE_NAMES.length) % meterClass.archetypes.length]!;
        const climate = INVENTED_CLIMATES[climateName];
        const study = simulateMeterStudy({
          archetype,
          climate,
          noise: { persistence: noise.persistence },
          design: TWO_YEARS_THEN_ONE,
          seed: deriveSeed(settings.seed, c, k, i),
        });
        return { study, normalYear: normalYearTemperatures(climate) };
      });
      for (const form of FORMS) {
        const options: NormalisedOptions = { temperatureForm: form };
        const fractions: number[] = [];
        const covered: { at68: boolean; at90: boolean }[] = [];
        for (const { study, normalYear } of studies) {
          const fit = selectedFit(baselineInForm(study.baseline, study.weather, form));
          const result = normalisedSavings(fit, study.reporting, study.weather, normalYear, options);
          if (result.available && result.fractionSaved !== null) {
            fractions.push(result.fractionSaved);
            const at90 = normalisedSavings(fit, study.reporting, study.weather, normalYear, {
              ...options,
              confidence: 0.9,
            });
            const band = (r: typeof result): number =>
              r.available && 'uncertainty' in r
                ? (r as { uncertainty: { absolute: number } }).uncertainty.absolute
                : Number.NaN;
            covered.push({
              at68: Math.abs(result.savings) <= band(result),
              at90: at90.available && Math.abs(at90.savings) <= band(at90),
            });
          }
        }
        const { mean, standardError } = meanWithError(fractions);
        rows.push({
          meterClass: meterClass.label,
          noise: noise.label,
          form,
          meters: studies.length,
          available: fractions.length,
          beyondThreshold: share(fractions, (f) => Math.abs(f) > NORMALISED_THRESHOLD),
          meanFraction: mean,
          standardError,
          covers68: share(covered, (c) => c.at68),
          covers90: share(covered, (c) => c.at90),
        });
      }
    });
  });
  return rows;
}
