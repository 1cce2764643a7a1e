/**
 * Experiment C: portfolio bands. Portfolios of meters on one station (same
 * weather, same read dates) whose day-to-day noise shares a station-wide
 * part, so their bill residuals correlate with a chosen intra-class
 * correlation (ICC); no retrofit, so the portfolio's true saving is 0. Per
 * ICC, form and combining method: how often the portfolio's total false
 * saving falls outside the combined 68% and 90% bands (nominal 32% and
 * 10%), the root-mean-square of total / 68% half-width (about 1 for a band
 * of the right width), and the ICC the baseline residuals actually show.
 * ICC 0 with weather-free meters is the control: independent meters with
 * no model-form error, where quadrature is right. With weather-dependent
 * meters a model-form error shared through the weather correlates the
 * meters even at ICC 0, and the realised ICC shows it.
 */
import {
  CLIMATE_NAMES,
  INVENTED_CLIMATES,
  TWO_YEARS_THEN_ONE,
  deriveSeed,
  simulatePortfolio,
  type Archetype,
  type ClimateName,
} from '../../support/simulation/index.js';
import {
  FORMS,
  baselineInForm,
  savingsAt,
  selectedFit,
  type TemperatureForm,
} from '../../support/temperature-forms.js';
import {
  PORTFOLIO_COMBINERS,
  PORTFOLIO_CONFIDENCES,
  UNCERTAINTY_FORMULAS,
  type PortfolioCombiner,
  type PortfolioMeterResult,
  type UncertaintyFormula,
} from './portfolio-combiners.js';
import { correlation, rms, share } from './tallies.js';

export interface PortfolioSettings {
  seed: number;
  /** Portfolios of each kind at each ICC. */
  portfoliosPerKind: number;
  metersPerPortfolio: number;
  intraClassCorrelations: readonly number[];
  /** Persistence φ of the meters' noise and the station's shocks. */
  persistence: number;
  combiners?: readonly PortfolioCombiner[];
}

/**
 * The kinds of portfolio: electric-like meters (cooling-dominated and 5P in
 * turn), gas-like meters (heating-dominated), and a control of weather-free
 * meters, which have no model-form error to share through the weather.
 */
export const PORTFOLIO_KINDS: readonly { label: string; archetypes: readonly Archetype[] }[] = [
  { label: 'electric-like', archetypes: ['cooling', 'fivePoint'] },
  { label: 'gas-like', archetypes: ['heating'] },
  { label: 'weather-free', archetypes: ['weatherFree'] },
];

/** Portfolio k of a kind: the climates in turn; the kind's archetypes in turn over its meters. */
function portfolioMix(
  kind: (typeof PORTFOLIO_KINDS)[number],
  k: number,
  meters: number,
): { climate: ClimateName; archetypes: Archetype[] } {
  const climate = CLIMATE_NAMES[k % CLIMATE_NAMES.length]!;
  const archetypes = Array.from({ length: meters }, (_, i) => kind.archetypes[i % kind.archetypes.length]!);
  return { climate, archetypes };
}

interface PortfolioOutcome {
  total: number;
  /** By combiner name, formula and confidence: does the band miss zero? */
  outside: Record<string, Record<UncertaintyFormula, Record<'68' | '90', boolean>>>;
  /** total / half-width at 68%, by combiner and formula. */
  ratio68: Record<string, Record<UncertaintyFormula, number>>;
  realisedIcc: number;
}

/** Mean pairwise correlation of the meters' baseline residuals (they share read dates). */
function meanPairwiseCorrelation(residuals: readonly (readonly number[])[]): number {
  let sum = 0;
  let pairs = 0;
  for (let i = 0; i < residuals.length; i++) {
    for (let j = i + 1; j < residuals.length; j++) {
      const r = correlation(residuals[i]!, residuals[j]!);
      if (Number.isFinite(r)) {
        sum += r;
        pairs++;
      }
    }
  }
  return pairs > 0 ? sum / pairs : Number.NaN;
}

function portfolioOutcome(
  meters: readonly PortfolioMeterResult[],
  combiners: readonly PortfolioCombiner[],
): PortfolioOutcome {
  const total = meters.reduce((sum, m) => sum + m.savings[0.68].totals.savings, 0);
  const outside: PortfolioOutcome['outside'] = {};
  const ratio68: PortfolioOutcome['ratio68'] = {};
  for (const combiner of combiners) {
    const byFormula = {} as Record<UncertaintyFormula, Record<'68' | '90', boolean>>;
    const ratios = {} as Record<UncertaintyFormula, number>;
    for (const formula of UNCERTAINTY_FORMULAS) {
      const [h68, h90] = PORTFOLIO_CONFIDENCES.map((confidence) => combiner.halfWidth(meters, confidence, formula));
      byFormula[formula] = { '68': Math.abs(total) > h68!, '90': Math.abs(total) > h90! };
      ratios[formula] = total / h68!;
    }
    outside[combiner.name] = byFormula;
    ratio68[combiner.name] = ratios;
  }
  return { total, outside, ratio68, realisedIcc: meanPairwiseCorrelation(meters.map((m) => m.baselineResiduals)) };
}

export interface PortfolioRow {
  intraClassCorrelation: number;
  kind: string;
  form: TemperatureForm;
  combiner: string;
  formula: UncertaintyFormula;
  portfolios: number;
  metersPerPortfolio: number;
  /** Mean over portfolios of the mean pairwise correlation of the meters' baseline residuals. */
  realisedIcc: number;
  /** Share of portfolios whose total falls outside the band (nominal 0.32 and 0.10). */
  outside68: number;
  outside90: number;
  /** Root mean square of total / 68% half-width (about 1 when the band is the right width). */
  rmsRatio68: number;
}

/** One row per ICC, kind of portfolio, form, combiner and formula. */
export function portfolioBands(settings: PortfolioSettings): PortfolioRow[] {
  const combiners = settings.combiners ?? PORTFOLIO_COMBINERS;
  const rows: PortfolioRow[] = [];
  settings.intraClassCorrelations.forEach((icc, level) => {
    PORTFOLIO_KINDS.forEach((kind, kindIndex) => {
      const outcomes: Record<TemperatureForm, PortfolioOutcome[]> = { mean: [], daily: [] };
      for (let k = 0; k < settings.portfoliosPerKind; k++) {
        const mix = portfolioMix(kind, k, settings.metersPerPortfolio);
        const portfolio = simulatePortfolio({
          climate: INVENTED_CLIMATES[mix.climate],
          archetypes: mix.archetypes,
          intraClassCorrelation: icc,
          persistence: settings.persistence,
          design: TWO_YEARS_THEN_ONE,
          seed: deriveSeed(settings.seed, level, kindIndex, k),
        });
        for (const form of FORMS) {
          const results: PortfolioMeterResult[] = portfolio.meters.map((meter) => {
            const analysis = baselineInForm(meter.baseline, portfolio.weather, form);
            const [at68, at90] = savingsAt(analysis, meter.reporting, portfolio.weather, PORTFOLIO_CONFIDENCES);
            const residuals = selectedFit(analysis).residuals;
            // The fit's residuals are in start-date order, as are its periods.
            const periods = [...analysis.periods].sort((a, b) => (a.start < b.start ? -1 : 1));
            return {
              savings: { 0.68: at68!, 0.9: at90! },
              baselineResiduals: residuals,
              baselinePeriods: periods.map((p, i) => ({ start: p.start, end: p.end, residual: residuals[i]! })),
            };
          });
          outcomes[form].push(portfolioOutcome(results, combiners));
        }
      }
      for (const form of FORMS) {
        const list = outcomes[form];
        const realisedIcc = list.reduce((sum, o) => sum + o.realisedIcc, 0) / list.length;
        for (const combiner of combiners) {
          for (const formula of UNCERTAINTY_FORMULAS) {
            rows.push({
              intraClassCorrelation: icc,
              kind: kind.label,
              form,
              combiner: combiner.name,
              formula,
              portfolios: list.length,
              metersPerPortfolio: settings.metersPerPortfolio,
              realisedIcc,
              outside68: share(list, (o) => o.outside[combiner.name]![formula]['68']),
              outside90: share(list, (o) => o.outside[combiner.name]![formula]['90']),
              rmsRatio68: rms(list.map((o) => o.ratio68[combiner.name]![formula])),
            });
          }
        }
      }
    });
  });
  return rows;
}
