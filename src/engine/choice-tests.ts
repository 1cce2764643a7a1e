/**
 * The tests behind the shape choice, each with a p-value that holds its
 * level (see choose.ts for how they are used).
 *
 * Two things make the plain extra-sum-of-squares F-test liberal for
 * changepoint shapes, and each is corrected here:
 * - a searched changepoint: the F of the best placement is the largest of
 *   many; where the changepoint does not exist under the simpler shape, the
 *   p-value is Davies' bound over the SSE profile of the placement
 *   (stats/davies-bound.ts);
 * - autocorrelated residuals: every F is divided by the variance inflation κ
 *   of the coefficient it tests under AR(1) errors
 *   (stats/autocorrelation-inflation.ts).
 * Where the changepoint exists under both shapes (a second slope at the same
 * changepoint, or a changepoint split in two) the F-test is regular.
 */
import type { ShapeFit } from './fit/fit-shape.js';
import type { BillDays } from './fit/day-resolved/bill-days.js';
import { coefficientNames } from './fit/shape-model.js';
import { bothSidesFeasible, hingeColumn } from './fit/day-resolved/hinge-sweep.js';
import { movingHingeMask } from './fit/day-resolved/five-point.js';
import { hingeProfile, type SseProfile } from './fit/day-resolved/profile.js';
import { fPValue } from './stats/distributions.js';
import { searchedChangepointPValue } from './stats/davies-bound.js';

export interface ChoiceTest {
  /** The F-statistic, divided by the variance inflation. */
  f: number;
  /** Denominator degrees of freedom (the numerator has one). */
  df2: number;
  /** The variance inflation the F was divided by (1: none). */
  inflation: number;
  pValue: number;
  /** 'searched': Davies' bound over the changepoint's path; 'regular': the F distribution. */
  method: 'searched' | 'regular';
  /** The test in words with its numbers. */
  text: string;
}

/**
 * What the tests need: the search's view of the periods, the minimum points
 * per segment, and each fit's per-coefficient variance inflation under the
 * noise's autocorrelation.
 */
export interface ChoiceContext {
  days: BillDays;
  minPoints: number;
  inflation: (fit: ShapeFit) => readonly number[];
}

/** Share of α spent on the one-slope family in the weather-dependence test; the rest goes to the two-slope (4P) family. */
export const ONE_SLOPE_SHARE = 0.8;

/** The largest variance inflation among a fit's slope coefficients (column 0 is the intercept; variables' columns follow the slopes). */
function slopeInflation(context: ChoiceContext, fit: ShapeFit): number {
  return Math.max(1, ...context.inflation(fit).slice(1, coefficientNames(fit.model).length));
}

function fStatistic(simplerSse: number, richerSse: number, df2: number, df1 = 1): number {
  if (!(richerSse > 0)) return simplerSse > richerSse ? Number.POSITIVE_INFINITY : 0;
  return Math.max(0, simplerSse - richerSse) / df1 / (richerSse / df2);
}

/** F along a profile of the richer shape against a fixed simpler SSE. */
function profileF(profile: SseProfile, simplerSse: number, df2: number, inflation: number, df1 = 1): number[] {
  return profile.sse.map((sse) => fStatistic(simplerSse, sse, df2, df1) / inflation);
}

function formatP(p: number): string {
  return p < 1e-4 ? '< 0.0001' : `= ${p.toFixed(4)}`;
}

function describe(test: Omit<ChoiceTest, 'text'>, against: string, df1 = 1): string {
  const adjusted =
    test.inflation > 1 ? `, divided by ${formatNumber(test.inflation)} for autocorrelated residuals` : '';
  const how =
    test.method === 'searched' ? 'p bounded over the searched changepoint (Davies 1987)' : 'p from the F distribution';
  return `against ${against}: F = ${formatNumber(test.f)} (${df1}, ${test.df2} degrees of freedom${adjusted}), ${how}, p ${formatP(test.pValue)}`;
}

function finish(test: Omit<ChoiceTest, 'text'>, against: string): ChoiceTest {
  return { ...test, text: describe(test, against) };
}

/**
 * Is there any weather dependence at all? The mean model (1P) against two
 * families at once, by a weighted Bonferroni split of α (ONE_SLOPE_SHARE):
 * - every one-slope shape: each 3PH placement, the straight line 2P and each
 *   3PC placement, which form one continuous path (a heating hinge above
 *   every temperature is the line, and so is a cooling hinge below every
 *   temperature), one added coefficient;
 * - every 4P placement (a heating and a cooling slope meeting), two added
 *   coefficients, for a V-shaped building whose arms a single slope averages away.
 * Each family's statistic is its largest F over the placements that may be
 * chosen, with Davies' bound over its whole path; the reported p-value is the
 * smaller of the two, each divided by its share of α.
 */
export function weatherDependenceTest(
  context: ChoiceContext,
  meanFit: ShapeFit,
  fits: { line: ShapeFit | null; heating: ShapeFit | null; cooling: ShapeFit | null; fourPoint: ShapeFit | null },
): ChoiceTest | null {
  const one = oneSlopeFamily(context, meanFit, fits);
  const two = fits.fourPoint ? fourPointFamily(context, meanFit, fits.fourPoint) : null;
  if (!one && !two) return null;
  const pOne = one ? Math.min(1, one.pValue / ONE_SLOPE_SHARE) : 1;
  const pTwo = two ? Math.min(1, two.pValue / (1 - ONE_SLOPE_SHARE)) : 1;
  const lead = pOne <= pTwo ? one! : two!;
  const pValue = Math.min(pOne, pTwo);
  const parts = [
    one
      ? `one-slope shapes (2P, 3PC, 3PH): F = ${formatNumber(one.f)} (1, ${one.df2}), p ${formatP(one.pValue)} of its share ${ONE_SLOPE_SHARE}·α`
      : null,
    two
      ? `4P: F = ${formatNumber(two.f)} (2, ${two.df2}), p ${formatP(two.pValue)} of its share ${formatNumber(1 - ONE_SLOPE_SHARE)}·α`
      : null,
  ].filter((part): part is string => part !== null);
  const adjusted =
    lead.inflation > 1 ? ` (F divided by ${formatNumber(lead.inflation)} for autocorrelated residuals)` : '';
  return {
    ...lead,
    pValue,
    text: `against 1P: ${parts.join('; ')}${adjusted}; p bounded over the searched changepoints (Davies 1987) and combined by a weighted Bonferroni split, p ${formatP(pValue)}`,
  };
}

function oneSlopeFamily(
  context: ChoiceContext,
  meanFit: ShapeFit,
  fits: { line: ShapeFit | null; heating: ShapeFit | null; cooling: ShapeFit | null },
): Omit<ChoiceTest, 'text'> | null {
  const { days, minPoints } = context;
  const df2 = days.n - 3 - days.extras.length; // p counts the variables too
  if (df2 <= 0) return null;
  const feasible = bothSidesFeasible(days, minPoints);
  let first = -1;
  let last = -1;
  for (let j = 0; j < feasible.length; j++) {
    if (feasible[j] === 1) {
      if (first < 0) first = j;
      last = j;
    }
  }
  const path: number[] = [];
  let observed = 0;
  let inflation = 1;
  if (fits.heating && first >= 0) {
    // From the first allowed placement up to the top, where the heating hinge becomes the line.
    const mask = new Uint8Array(feasible.length);
    for (let j = first; j + 1 < mask.length; j++) mask[j] = 1;
    const kappa = slopeInflation(context, fits.heating);
    path.push(...profileF(hingeProfile(days, 'heating', null, mask), meanFit.sse, df2, kappa));
    observed = Math.max(observed, fStatistic(meanFit.sse, fits.heating.sse, df2) / kappa);
    inflation = Math.max(inflation, kappa);
  }
  if (fits.line) {
    const kappa = slopeInflation(context, fits.line);
    const f = fStatistic(meanFit.sse, fits.line.sse, df2) / kappa;
    path.push(f);
    observed = Math.max(observed, f);
    inflation = Math.max(inflation, kappa);
  }
  if (fits.cooling && last >= 0) {
    // From the bottom, where the cooling hinge is the line, up to the last allowed placement.
    const mask = new Uint8Array(feasible.length);
    for (let j = 0; j <= last; j++) mask[j] = 1;
    const kappa = slopeInflation(context, fits.cooling);
    path.push(...profileF(hingeProfile(days, 'cooling', null, mask), meanFit.sse, df2, kappa));
    observed = Math.max(observed, fStatistic(meanFit.sse, fits.cooling.sse, df2) / kappa);
    inflation = Math.max(inflation, kappa);
  }
  if (path.length === 0) return null;
  const searched = Boolean(fits.heating || fits.cooling);
  const pValue = searched ? searchedChangepointPValue({ path, observed, df2 }) : fPValue(observed, 1, df2);
  return { f: observed, df2, inflation, pValue, method: searched ? 'searched' : 'regular' };
}

function fourPointFamily(
  context: ChoiceContext,
  meanFit: ShapeFit,
  fourPoint: ShapeFit,
): Omit<ChoiceTest, 'text'> | null {
  const { days, minPoints } = context;
  const df2 = days.n - 4 - days.extras.length; // p counts the variables too
  if (df2 <= 0) return null;
  const kappa = slopeInflation(context, fourPoint);
  const path = profileF(
    hingeProfile(days, 'heating', days.mean, bothSidesFeasible(days, minPoints)),
    meanFit.sse,
    df2,
    kappa,
    2,
  );
  const observed = fStatistic(meanFit.sse, fourPoint.sse, df2, 2) / kappa;
  return {
    f: observed,
    df2,
    inflation: kappa,
    pValue: searchedChangepointPValue({ path, observed, df2, df1: 2 }),
    method: 'searched',
  };
}

/**
 * Does the line bend? The straight line (2P) against the 4P, whose
 * changepoint does not exist under the line: Davies' bound over the 4P's
 * profile.
 */
export function bendTest(context: ChoiceContext, line: ShapeFit, fourPoint: ShapeFit): ChoiceTest | null {
  const { days, minPoints } = context;
  const df2 = days.n - 4 - days.extras.length; // p counts the variables too
  if (df2 <= 0) return null;
  const kappa = slopeInflation(context, fourPoint);
  const path = profileF(
    hingeProfile(days, 'heating', days.mean, bothSidesFeasible(days, minPoints)),
    line.sse,
    df2,
    kappa,
  );
  const observed = fStatistic(line.sse, fourPoint.sse, df2) / kappa;
  return finish(
    {
      f: observed,
      df2,
      inflation: kappa,
      pValue: searchedChangepointPValue({ path, observed, df2 }),
      method: 'searched',
    },
    '2P',
  );
}

/**
 * A second branch with a changepoint of its own: a 3PH (or 3PC) against the
 * 5P, whose other changepoint does not exist under the one-branch shape.
 * The profile moves that changepoint with the first held where the 5P has it.
 */
export function secondBranchTest(context: ChoiceContext, oneBranch: ShapeFit, fivePoint: ShapeFit): ChoiceTest | null {
  const { days, minPoints } = context;
  const df2 = days.n - 5 - days.extras.length; // p counts the variables too
  if (df2 <= 0) return null;
  const heating = fivePoint.changepoints.heating! - days.tempShift;
  const cooling = fivePoint.changepoints.cooling! - days.tempShift;
  const moving = oneBranch.model === '3PH' ? 'cooling' : 'heating';
  const fixed = moving === 'cooling' ? hingeColumn(days, 'heating', heating) : hingeColumn(days, 'cooling', cooling);
  const mask = movingHingeMask(days, moving, heating, cooling, minPoints);
  const inflation = context.inflation(fivePoint);
  const kappa = Math.max(1, (moving === 'cooling' ? inflation[2] : inflation[1]) ?? 1);
  const path = profileF(hingeProfile(days, moving, fixed, mask), oneBranch.sse, df2, kappa);
  const observed = fStatistic(oneBranch.sse, fivePoint.sse, df2) / kappa;
  return finish(
    {
      f: observed,
      df2,
      inflation: kappa,
      pValue: searchedChangepointPValue({ path, observed, df2 }),
      method: 'searched',
    },
    oneBranch.model,
  );
}

/**
 * A richer shape whose extra parameter is a regular one: a second slope at
 * the one changepoint (4P against 3PC or 3PH), or that changepoint split in
 * two (5P against 4P). One numerator degree of freedom.
 */
export function regularTest(context: ChoiceContext, simpler: ShapeFit, richer: ShapeFit): ChoiceTest | null {
  const df2 = richer.n - richer.p;
  if (df2 <= 0) return null;
  const kappa = slopeInflation(context, richer);
  const f = fStatistic(simpler.sse, richer.sse, df2) / kappa;
  return finish({ f, df2, inflation: kappa, pValue: fPValue(f, 1, df2), method: 'regular' }, simpler.model);
}

function formatNumber(value: number): string {
  if (!Number.isFinite(value)) return String(value);
  const magnitude = Math.abs(value);
  if (magnitude !== 0 && (magnitude >= 1e6 || magnitude < 1e-3)) return value.toExponential(3);
  return Number(value.toPrecision(4)).toString();
}
