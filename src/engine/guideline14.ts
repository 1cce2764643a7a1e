/**
 * ASHRAE Guideline 14 acceptance of a baseline model.
 *
 * The limits are FROM MEMORY of the 2002 and 2014 editions, not checked
 * against the document: CV(RMSE) at most 20% with under 12 months of
 * reporting data, 25% for 12–60 months, 30% beyond; net determination bias
 * (NMBE) within 0.005%. They are configurable; verify them against the
 * edition named in the contract's M&V plan.
 */
import type { FitStatistics } from './fit/fit-shape.js';

export interface Guideline14Limits {
  /** Largest acceptable CV(RMSE), as a fraction. */
  cvrmse: number;
  /** Largest acceptable |NMBE|, as a fraction. */
  nmbe: number;
  /** Where the limits come from, shown beside every verdict. */
  source: string;
}

export const GUIDELINE14_SOURCE =
  'ASHRAE Guideline 14 whole-facility regression limits (from memory of the 2002/2014 editions; verify against the edition in the M&V plan)';

/** Defaults: the strictest CV(RMSE) limit (under 12 reporting months) and the 0.005% bias limit. */
export const DEFAULT_GUIDELINE14_LIMITS: Guideline14Limits = {
  cvrmse: 0.2,
  nmbe: 0.00005,
  source: GUIDELINE14_SOURCE,
};

/**
 * The CV(RMSE) limit for a reporting period of the given length (from memory, see above).
 * @example cvrmseLimitForReportingMonths(12) // 0.25 — 12 to 60 reporting months (source: ASHRAE Guideline 14, from memory)
 */
export function cvrmseLimitForReportingMonths(months: number): number {
  if (months < 12) return 0.2;
  if (months <= 60) return 0.25;
  return 0.3;
}

export interface Guideline14Check {
  cvrmse: { value: number; limit: number; pass: boolean };
  nmbe: { value: number; limit: number; pass: boolean };
  pass: boolean;
  source: string;
  /**
   * The same statistics out of sample (stats/out-of-sample.ts), beside the
   * in-sample values the Guideline defines; null where not computed.
   */
  outOfSample?: { cvrmse: number; nmbe: number; method: string } | null;
  /** What the in-sample check can and cannot show. */
  note?: string;
}

/** Why the in-sample NMBE check always passes for these fits. */
export const IN_SAMPLE_NMBE_NOTE =
  'in-sample NMBE of a least-squares fit with an intercept is zero by construction, so that check cannot fail; the out-of-sample NMBE beside it can';

/**
 * @example guideline14Check({ cvrmse: 0.15, nmbe: 0 }, DEFAULT_GUIDELINE14_LIMITS).pass // true — 15% ≤ 20% and 0 ≤ 0.005% (source: ASHRAE Guideline 14 limits, from memory)
 */
export function guideline14Check(
  stats: Pick<FitStatistics, 'cvrmse' | 'nmbe' | 'outOfSample'>,
  limits: Guideline14Limits,
): Guideline14Check {
  const cvPass = stats.cvrmse <= limits.cvrmse;
  const nmbePass = Math.abs(stats.nmbe) <= limits.nmbe;
  const outOfSample = stats.outOfSample;
  return {
    cvrmse: { value: stats.cvrmse, limit: limits.cvrmse, pass: cvPass },
    nmbe: { value: stats.nmbe, limit: limits.nmbe, pass: nmbePass },
    pass: cvPass && nmbePass,
    source: limits.source,
    outOfSample: outOfSample
      ? { cvrmse: outOfSample.cvrmse, nmbe: outOfSample.nmbe, method: outOfSample.method }
      : null,
    note: IN_SAMPLE_NMBE_NOTE,
  };
}
