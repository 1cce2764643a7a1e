/**
 * Choosing the baseline shape.
 *
 * Step 1, screening: every fitted candidate is checked on its own and is
 * rejected when
 *   - a slope has the wrong physical sign (use must rise as it gets colder on
 *     a heating branch and as it gets warmer on a cooling branch; a 4P must
 *     bend upward, its slope below the changepoint lower than above it, and by
 *     default be a heating slope meeting a cooling slope, because averaging
 *     bills over their days rounds a single 3PC or 3PH knee into a same-signed
 *     4P; a 5P needs a flat band of positive width), or
 *   - a slope is not significant: |t| below the two-sided Student t critical
 *     value at level α (default 0.05) with n − p degrees of freedom, or
 *   - a segment holds fewer than the minimum number of points (default 3).
 *
 * Step 2, parsimony: starting from the mean model (1P), shapes are visited by
 * increasing parameter count. A shape replaces the current choice only if it
 * passed screening and its extra parameters earn their keep by the
 * extra-sum-of-squares F-test against the current choice:
 *   F = ((SSE_cur − SSE_new)/(p_new − p_cur)) / (SSE_new/(n − p_new)) > F_crit(α).
 * Among shapes of equal p (3PC and 3PH) the one with the lower SSE wins.
 *
 * Why the F-test and not an information criterion: its verdict reads as a
 * plain sentence with numbers an engineer can check ("F = 14.2 > 3.3"), and
 * since p counts the changepoints it is conservative for changepoint shapes,
 * whose changepoint is not a regular linear parameter. AICc is reported
 * beside it for information only.
 */
import { MODEL_NAMES, type ModelName, type Period, type TemperatureForm } from './types.js';
import { fitShape, periodsHaveDays, type ShapeFit, type ShapeFitResult } from './fit/fit-shape.js';
import { fCritical, fPValue, twoSidedTCritical } from './stats/distributions.js';
import { guideline14Check, type Guideline14Check, type Guideline14Limits, DEFAULT_GUIDELINE14_LIMITS } from './guideline14.js';

export interface SelectionOptions {
  /** Two-sided level α of the slope t-tests and of the F-test. Default 0.05. */
  significanceLevel?: number;
  /** Minimum points in every segment of a changepoint shape. Default 3. */
  minPointsPerSegment?: number;
  /** Guideline 14 acceptance limits. */
  guideline14?: Partial<Guideline14Limits>;
  /**
   * Accept a 4P whose two slopes have the same sign (one branch that bends).
   * Default false: averaging bills over their days rounds a single 3PC or 3PH
   * knee into exactly that shape, so it is read as one branch, not two.
   */
  allowSameSignFourPoint?: boolean;
  /** Shapes to consider (default all six). */
  models?: readonly ModelName[];
  /**
   * How each reading's weather enters the fit. Default 'daily' (day-resolved)
   * when every period carries its days' temperatures, as aligned readings do;
   * 'mean' for periods that only have a mean temperature.
   */
  temperatureForm?: TemperatureForm;
}

/** The form a fit of these periods uses: the one asked for, else day-resolved wherever the days are known. */
export function resolveTemperatureForm(periods: readonly Period[], asked: TemperatureForm | undefined): TemperatureForm {
  if (asked === 'daily' && !periodsHaveDays(periods)) {
    throw new RangeError('the day-resolved form needs the daily temperatures of every period (align the readings with alignPeriods)');
  }
  return asked ?? (periods.length > 0 && periodsHaveDays(periods) ? 'daily' : 'mean');
}

export const DEFAULT_SIGNIFICANCE_LEVEL = 0.05;
export const DEFAULT_MIN_POINTS_PER_SEGMENT = 3;

export type Verdict = 'selected' | 'accepted' | 'rejected' | 'not-fitted';

export interface Candidate {
  model: ModelName;
  verdict: Verdict;
  /** Passed screening (sign, significance, points per segment). */
  accepted: boolean;
  /** Plain-language reasons for the verdict. */
  reasons: string[];
  n: number;
  p: number;
  /** The fit; absent when the shape could not be fitted at all. */
  fit: ShapeFit | null;
  /** Small-sample Akaike criterion n·ln(SSE/n) + 2p + 2p(p+1)/(n − p − 1), for information. */
  aicc: number | null;
  guideline14: Guideline14Check | null;
}

export interface BaselineChoice {
  selected: ModelName;
  candidates: Candidate[];
  settings: { significanceLevel: number; minPointsPerSegment: number; guideline14: Guideline14Limits; temperatureForm: TemperatureForm };
}

/** Fit every shape to the baseline periods and choose one. Throws if there are fewer than 2 periods. */
export function chooseBaseline(periods: readonly Period[], options: SelectionOptions = {}): BaselineChoice {
  const alpha = options.significanceLevel ?? DEFAULT_SIGNIFICANCE_LEVEL;
  const minPoints = options.minPointsPerSegment ?? DEFAULT_MIN_POINTS_PER_SEGMENT;
  const limits: Guideline14Limits = { ...DEFAULT_GUIDELINE14_LIMITS, ...options.guideline14 };
  if (!(alpha > 0 && alpha < 1)) throw new RangeError(`significanceLevel must lie in (0, 1), got ${alpha}`);
  if (!Number.isInteger(minPoints) || minPoints < 1) throw new RangeError(`minPointsPerSegment must be a positive integer, got ${minPoints}`);
  if (periods.length < 2) throw new RangeError(`at least 2 usable periods are needed to fit a baseline, got ${periods.length}`);

  const models = (options.models ?? MODEL_NAMES).includes('1P') ? (options.models ?? MODEL_NAMES) : ['1P' as const, ...(options.models ?? [])];
  const form = resolveTemperatureForm(periods, options.temperatureForm);
  const rules: ScreeningRules = { alpha, minPoints, allowSameSignFourPoint: options.allowSameSignFourPoint ?? false };
  const candidates = models.map((model) => screen(fitShape(periods, model, minPoints, form), rules, limits));

  let current = candidates.find((c) => c.model === '1P' && c.accepted)!;
  const byP = [...new Set(candidates.map((c) => c.p))].sort((a, b) => a - b);
  for (const p of byP) {
    if (p <= current.p) continue;
    const contenders: Candidate[] = [];
    for (const c of candidates.filter((cand) => cand.p === p && cand.accepted)) {
      const test = nestedFTest(current.fit!, c.fit!, alpha);
      if (test.passes) contenders.push(c);
      else c.reasons.push(`does not improve enough on ${current.model}: ${test.text}`);
      c.reasons.push(`AICc ${formatNumber(c.aicc ?? Number.NaN)} (for information)`);
    }
    if (contenders.length === 0) continue;
    contenders.sort((a, b) => a.fit!.sse - b.fit!.sse);
    const winner = contenders[0]!;
    winner.reasons.push(`improves on ${current.model}: ${nestedFTest(current.fit!, winner.fit!, alpha).text}`);
    for (const other of contenders.slice(1)) {
      other.reasons.push(`improves on ${current.model} but fits worse than ${winner.model} (SSE ${formatNumber(other.fit!.sse)} > ${formatNumber(winner.fit!.sse)})`);
    }
    current = winner;
  }
  for (const c of candidates) {
    if (c.accepted) c.verdict = c === current ? 'selected' : 'accepted';
  }
  if (current.model === '1P') current.reasons.push('no weather-dependent shape passed screening and earned its extra parameters');
  return { selected: current.model, candidates, settings: { significanceLevel: alpha, minPointsPerSegment: minPoints, guideline14: limits, temperatureForm: form } };
}

interface ScreeningRules {
  alpha: number;
  minPoints: number;
  allowSameSignFourPoint: boolean;
}

function screen(result: ShapeFitResult, rules: ScreeningRules, limits: Guideline14Limits): Candidate {
  const { alpha, minPoints } = rules;
  if (!result.ok) {
    return { model: result.model, verdict: 'not-fitted', accepted: false, reasons: [`could not be fitted: ${result.reason}`], n: result.n, p: result.p, fit: null, aicc: null, guideline14: null };
  }
  const fit = result;
  const reasons: string[] = [];
  const dof = fit.n - fit.p;
  const tCritical = twoSidedTCritical(1 - alpha, dof);
  const coefficient = (name: string) => fit.coefficients.find((c) => c.name === name)!;
  const slopeWords: Record<string, string> = {
    slope: 'slope',
    heatingSlope: 'heating slope',
    coolingSlope: 'cooling slope',
    slopeBelow: 'slope below the changepoint',
    slopeAbove: 'slope above the changepoint',
  };

  // Physical signs.
  const heating = fit.parameters.heatingSlope;
  const cooling = fit.parameters.coolingSlope;
  if (heating !== undefined && !(heating < 0)) {
    reasons.push(`heating slope has the wrong sign: ${formatNumber(heating)} per degree (use must rise as it gets colder)`);
  }
  if (cooling !== undefined && !(cooling > 0)) {
    reasons.push(`cooling slope has the wrong sign: ${formatNumber(cooling)} per degree (use must rise as it gets warmer)`);
  }
  if (fit.model === '4P') {
    const below = fit.parameters.slopeBelow!;
    const above = fit.parameters.slopeAbove!;
    if (!(below < above)) {
      reasons.push(`bends the wrong way: slope below the changepoint (${formatNumber(below)}) is not lower than above it (${formatNumber(above)})`);
    } else if (!rules.allowSameSignFourPoint && !(below < 0 && above > 0)) {
      reasons.push(
        `both slopes are ${above <= 0 ? 'heating' : 'cooling'} slopes (${formatNumber(below)} and ${formatNumber(above)}): one branch with a rounded knee, as bill averaging makes it, is left to ${above <= 0 ? '3PH' : '3PC'}`,
      );
    }
  }
  if (fit.model === '5P' && !(fit.changepoints.heating! < fit.changepoints.cooling!)) {
    reasons.push('heating and cooling changepoints coincide: no flat band (a 4P shape)');
  }

  // Significance of every slope.
  for (const c of fit.coefficients) {
    const words = slopeWords[c.name];
    if (!words) continue;
    const t = Math.abs(coefficient(c.name).tStat);
    if (!(t >= tCritical)) {
      reasons.push(`${words} not significant: |t| = ${t.toFixed(2)} < ${tCritical.toFixed(2)} (two-sided, α = ${alpha}, ${dof} degrees of freedom)`);
    }
  }

  // Points per segment.
  if (fit.model !== '1P' && fit.model !== '2P') {
    for (const [segment, count] of Object.entries(fit.segmentCounts)) {
      if (count < minPoints) reasons.push(`too few points in the ${segment} segment: ${count} < ${minPoints}`);
    }
  }

  const accepted = reasons.length === 0;
  if (accepted) reasons.push('passes the sign, significance and points-per-segment checks');
  return {
    model: fit.model,
    verdict: accepted ? 'accepted' : 'rejected',
    accepted,
    reasons,
    n: fit.n,
    p: fit.p,
    fit,
    aicc: aicc(fit),
    guideline14: guideline14Check(fit.stats, limits),
  };
}

function aicc(fit: ShapeFit): number | null {
  const { n, p, sse } = fit;
  if (n - p - 1 <= 0 || !(sse > 0)) return null;
  return n * Math.log(sse / n) + 2 * p + (2 * p * (p + 1)) / (n - p - 1);
}

interface FTestResult {
  passes: boolean;
  text: string;
}

/** Extra-sum-of-squares F-test of a richer shape against a simpler one. */
export function nestedFTest(simpler: ShapeFit, richer: ShapeFit, alpha: number): FTestResult {
  const df1 = richer.p - simpler.p;
  const df2 = richer.n - richer.p;
  if (df1 <= 0 || df2 <= 0) return { passes: false, text: `no degrees of freedom to test (${df1}, ${df2})` };
  const reduction = Math.max(0, simpler.sse - richer.sse);
  const f = richer.sse > 0 ? reduction / df1 / (richer.sse / df2) : Number.POSITIVE_INFINITY;
  const critical = fCritical(alpha, df1, df2);
  const passes = f > critical;
  return {
    passes,
    text: `F = ${formatNumber(f)} ${passes ? '>' : '≤'} ${critical.toFixed(2)} (α = ${alpha}; ${df1}, ${df2} degrees of freedom; p ${formatP(fPValue(f, df1, df2))})`,
  };
}

function formatNumber(value: number): string {
  if (!Number.isFinite(value)) return String(value);
  const magnitude = Math.abs(value);
  if (magnitude !== 0 && (magnitude >= 1e6 || magnitude < 1e-3)) return value.toExponential(3);
  return Number(value.toPrecision(4)).toString();
}

function formatP(p: number): string {
  return p < 1e-4 ? '< 0.0001' : `= ${p.toFixed(4)}`;
}

