/**
 * A savings document with the checks that stand between a frozen baseline
 * and its projection (sufficiency.ts): whether the baseline covers a full
 * cycle of seasons, how much of the reporting weather it never saw, and the
 * overrides, each with its reason, that let a projection go ahead past
 * either. The command line and the service state the same keys, so a
 * savings document says what it rests on wherever it comes from.
 */
import type { SavingsDocument } from './documents.js';
import type { BaselineSufficiency, ReportingExtrapolation } from './sufficiency.js';

/** What was allowed past a check, each with the reason given; null where nothing was. */
export interface ProjectionOverrides {
  /** Projecting from a baseline shorter than a full cycle of seasons. */
  shortBaseline: { reason: string } | null;
  /** Projecting onto reporting weather beyond the extrapolation limit. */
  extrapolation: { reason: string } | null;
}

export const NO_OVERRIDES: ProjectionOverrides = { shortBaseline: null, extrapolation: null };

export interface CheckedSavingsDocument extends SavingsDocument {
  baseline: SavingsDocument['baseline'] & { sufficiency: BaselineSufficiency; overrides: ProjectionOverrides };
  /** The share of the reporting days outside the weather the baseline saw, against its limit. */
  extrapolation: ReportingExtrapolation;
}

/** One check that failed without its override, in words. */
export interface ProjectionRefusal {
  check: 'shortBaseline' | 'extrapolation';
  reason: string;
}

/**
 * The checks that refuse the projection: a baseline shorter than a full
 * cycle of seasons (when `requireSufficiency`) and an extrapolation share
 * above its limit, each unless overridden. Empty when it may go ahead.
 */
export function projectionRefusals(
  checks: { sufficiency: BaselineSufficiency; extrapolation: ReportingExtrapolation; overrides: ProjectionOverrides },
  options: { requireSufficiency: boolean },
): ProjectionRefusal[] {
  const refusals: ProjectionRefusal[] = [];
  if (options.requireSufficiency && !checks.sufficiency.sufficient && checks.overrides.shortBaseline === null) {
    refusals.push({
      check: 'shortBaseline',
      reason: `the baseline is too short to project from: ${checks.sufficiency.reasons.join('; ')}`,
    });
  }
  if (checks.extrapolation.exceedsLimit && checks.overrides.extrapolation === null) {
    refusals.push({
      check: 'extrapolation',
      reason: `the reporting weather lies outside what the baseline saw: ${checks.extrapolation.summary}`,
    });
  }
  return refusals;
}

/** The document with its checks stated: baseline.sufficiency, baseline.overrides and extrapolation. */
export function withProjectionChecks(
  document: SavingsDocument,
  checks: { sufficiency: BaselineSufficiency; extrapolation: ReportingExtrapolation; overrides: ProjectionOverrides },
): CheckedSavingsDocument {
  return {
    ...document,
    baseline: { ...document.baseline, sufficiency: checks.sufficiency, overrides: checks.overrides },
    extrapolation: checks.extrapolation,
  };
}
