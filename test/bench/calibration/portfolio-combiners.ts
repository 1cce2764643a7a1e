/**
 * Ways of combining meters' savings bands into one portfolio band. Each is
 * a function of every meter's savings documents (at 68% and 90%
 * confidence) and its baseline residuals, so a method that uses the
 * between-meter correlation of the residuals can be added beside the plain
 * one and measured on the same portfolios.
 */
import { combineInQuadrature, type SavingsDocument } from '../../../src/engine/index.js';
import { combineCorrelated, residualCorrelation } from '../../../src/engine/portfolio-correlation.js';

export type PortfolioConfidence = 0.68 | 0.9;
export const PORTFOLIO_CONFIDENCES: readonly PortfolioConfidence[] = [0.68, 0.9];

/** Which of the engine's two uncertainty formulas a band is built from. */
export type UncertaintyFormula = 'exact' | 'guideline14';
export const UNCERTAINTY_FORMULAS: readonly UncertaintyFormula[] = ['exact', 'guideline14'];

export interface PortfolioMeterResult {
  /** The meter's savings document at each confidence. */
  savings: Readonly<Record<PortfolioConfidence, SavingsDocument>>;
  /** Energy residuals of the meter's selected baseline fit, in time order; the portfolio's meters share their read dates. */
  baselineResiduals: readonly number[];
  /** The same residuals with their periods, as the engine's correlation estimate takes them. */
  baselinePeriods: readonly { start: string; end: string; residual: number }[];
}

export interface PortfolioCombiner {
  name: string;
  /** Half-width of the portfolio's savings band at `confidence`, from the meters' `formula` bands. */
  halfWidth(
    meters: readonly PortfolioMeterResult[],
    confidence: PortfolioConfidence,
    formula: UncertaintyFormula,
  ): number;
}

/** The engine's roll-up: the meters' half-widths in quadrature, as if the meters were independent. */
export const IN_QUADRATURE: PortfolioCombiner = {
  name: 'in quadrature',
  halfWidth: (meters, confidence, formula) =>
    combineInQuadrature(meters.map((m) => m.savings[confidence].totals.uncertainty[formula].absolute)),
};

/**
 * The engine's correlation-aware roll-up: the pooled between-meter
 * correlation of the baseline residuals (engine/portfolio-correlation.ts),
 * every meter on the portfolio's one station.
 */
export const WITH_RESIDUAL_CORRELATION: PortfolioCombiner = {
  name: 'with residual correlation',
  halfWidth: (meters, confidence, formula) => {
    const correlation = residualCorrelation(meters.map((m) => ({ group: 'station', periods: m.baselinePeriods })));
    return combineCorrelated(
      meters.map((m) => ({ value: m.savings[confidence].totals.uncertainty[formula].absolute, group: 'station' })),
      correlation,
    );
  },
};

/** The combiners measured. */
export const PORTFOLIO_COMBINERS: readonly PortfolioCombiner[] = [IN_QUADRATURE, WITH_RESIDUAL_CORRELATION];
