/**
 * Choosing the baseline shape.
 *
 * Step 1, screening: every fitted candidate is checked on its own and is
 * rejected when
 *   - a slope has the wrong physical sign (use must rise as it gets colder on
 *     a heating branch and as it gets warmer on a cooling branch; a 4P must
 *     bend upward, its slope below the changepoint lower than above it, and by
 *     default be a heating slope meeting a cooling slope: a 4P whose slopes
 *     share a sign is one branch with a bend, left to 3PC or 3PH; a 5P needs a
 *     flat band of positive width), or
 *   - a slope is not significant: |t| below the two-sided Student t critical
 *     value at level α (default 0.05) with n − p degrees of freedom, t taken
 *     with the residuals' autocorrelation allowed for (Coefficient.tStatAdjusted), or
 *   - a segment holds fewer than the minimum number of points (default 3).
 *
 * Step 2, parsimony, as a sequence of tests that each hold level α
 * (choice-tests.ts: searched changepoints by Davies' bound, autocorrelated
 * residuals by each coefficient's variance inflation):
 *   1. weather dependence: the mean model 1P against every one-slope shape
 *      (2P, every 3PH and 3PC placement) tested as one family; if it is not
 *      significant the choice is 1P;
 *   2. among the screened one-slope shapes, 3PC against 3PH by the lower SSE;
 *      the 3P over the straight line 2P only if the line bends (2P against
 *      the 4P's searched changepoint);
 *   3. from a 3PC or 3PH, the 4P (a second slope at the same changepoint,
 *      a regular test), then the 5P (from the 4P: the changepoint split in
 *      two, regular; from a 3P: a second branch with a changepoint of its
 *      own, searched).
 * A shape that fails a test keeps the reason in words with its numbers. AICc
 * is reported beside each for information only.
 *
 * Why tests and not an information criterion: each verdict reads as a plain
 * sentence with numbers an engineer can check, and each holds a stated error
 * rate, measured by simulation (test/bench/calibration.ts).
 */
import { MIN_BASELINE_PERIODS, TooFewPeriodsError, VariableChoiceError } from './errors.js';
import { MODEL_NAMES, type ModelName, type Period, type TemperatureForm } from './types.js';
import {
  fitShape,
  periodsHaveDays,
  searchView,
  withAutocorrelation,
  type ShapeFit,
  type ShapeFitResult,
} from './fit/fit-shape.js';
import {
  bendTest,
  regularTest,
  secondBranchTest,
  weatherDependenceTest,
  type ChoiceContext,
  type ChoiceTest,
} from './choice-tests.js';
import { fCritical, fPValue, twoSidedTCritical } from './stats/distributions.js';
import {
  guideline14Check,
  type Guideline14Check,
  type Guideline14Limits,
  DEFAULT_GUIDELINE14_LIMITS,
} from './guideline14.js';

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
  /**
   * Independent variables the model may carry (names in Period.variables).
   * Each must earn its place: see chooseVariables. Default none (weather only).
   */
  variables?: readonly string[];
  /** The engineer's decisions on variables: forced in or out, each with its reason on record. */
  variableOverrides?: readonly VariableOverride[];
}

/** An engineer's decision to keep or leave out a variable whatever the tests say. */
export interface VariableOverride {
  name: string;
  include: boolean;
  reason: string;
}

/** What happened to one candidate variable, and why, in words with the numbers. */
export interface VariableDecision {
  name: string;
  verdict: 'kept' | 'dropped' | 'forced-in' | 'forced-out';
  reasons: string[];
  /** t of its coefficient in the chosen model (with the residuals' autocorrelation allowed for), when it is in it. */
  tStat?: number;
  /** Partial F of the variable in the chosen shape (the shape refitted without it, changepoints searched again) and its p-value. */
  partialF?: number;
  pValue?: number;
}

/** The form a fit of these periods uses: the one asked for, else day-resolved wherever the days are known. */
export function resolveTemperatureForm(
  periods: readonly Period[],
  asked: TemperatureForm | undefined,
): TemperatureForm {
  if (asked === 'daily' && !periodsHaveDays(periods)) {
    throw new RangeError(
      'the day-resolved form needs the daily temperatures of every period (align the readings with alignPeriods)',
    );
  }
  return asked ?? (periods.length > 0 && periodsHaveDays(periods) ? 'daily' : 'mean');
}

export const DEFAULT_SIGNIFICANCE_LEVEL = 0.05;
export const DEFAULT_MIN_POINTS_PER_SEGMENT = 3;

export type Verdict = 'selected' | 'accepted' | 'rejected' | 'not-fitted';

/**
 * A candidate whose out-of-sample CV(RMSE) exceeds its in-sample CV(RMSE) by
 * more than this factor is flagged as over-fitted (a limit of our own; for a
 * well-specified shape the ratio is about √(1 + p/n), 1.1 for 5 parameters
 * and 36 periods).
 */
export const OVERFIT_RATIO = 1.5;

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
  /** Out-of-sample CV(RMSE) far above the in-sample one (OVERFIT_RATIO): the shape fits its own periods better than it predicts others. */
  overFitted: boolean;
  guideline14: Guideline14Check | null;
}

export interface BaselineChoice {
  selected: ModelName;
  candidates: Candidate[];
  settings: {
    significanceLevel: number;
    minPointsPerSegment: number;
    guideline14: Guideline14Limits;
    temperatureForm: TemperatureForm;
  };
  /** The variables in the chosen model (absent for a weather-only choice). */
  variables?: string[];
  /** Every candidate variable's decision (absent when none was offered). */
  variableDecisions?: VariableDecision[];
}

/**
 * Whether α can be tested at: inside (0, 1), and so far from 0 that the
 * confidence 1 − α is still below 1 in double precision (a level under about
 * 1.1e-16 rounds it to 1, and no t quantile exists there).
 * @example isUsableSignificanceLevel(0.05) // true — an ordinary level (source: by hand)
 * @example isUsableSignificanceLevel(5e-324) // false — 1 − 5e-324 rounds to 1 in IEEE 754 double precision (source: common practice)
 */
export function isUsableSignificanceLevel(alpha: number): boolean {
  return alpha > 0 && alpha < 1 && 1 - alpha < 1;
}

/**
 * Fit every shape to the baseline periods and choose one. Throws
 * TooFewPeriodsError below MIN_BASELINE_PERIODS (with no excluded periods:
 * analyseBaseline, which aligns, says which were left out). With candidate
 * variables, chooses them first (chooseVariables), then the shape with them.
 */
export function chooseBaseline(periods: readonly Period[], options: SelectionOptions = {}): BaselineChoice {
  const offered = options.variables ?? [];
  const overrides = options.variableOverrides ?? [];
  if (offered.length === 0 && overrides.length === 0) return chooseShape(periods, options, []);
  return chooseVariables(periods, options, offered, overrides);
}

/**
 * Which variables the model carries. Backward elimination: fit and choose
 * the shape with every candidate (forced-out ones left out), then test each
 * variable not forced in by the t-test of its coefficient (two-sided, level
 * α, n − p degrees of freedom, autocorrelation allowed for) and the partial
 * F-test (the chosen shape refitted without it, its changepoints searched
 * again: F = (SSE_without − SSE_with)/(SSE_with/(n − p))); a variable must
 * pass both to stay. The weakest failing variable (lowest |t|) is dropped
 * and the choice repeated until every remaining one passes. Both tests are
 * the standard ones for a regression term (common practice); the reasons
 * carry the numbers.
 */
function chooseVariables(
  periods: readonly Period[],
  options: SelectionOptions,
  offered: readonly string[],
  overrides: readonly VariableOverride[],
): BaselineChoice {
  const alpha = options.significanceLevel ?? DEFAULT_SIGNIFICANCE_LEVEL;
  const minPoints = options.minPointsPerSegment ?? DEFAULT_MIN_POINTS_PER_SEGMENT;
  const names = [...new Set([...offered, ...overrides.map((o) => o.name)])];
  const forced = new Map(overrides.map((o) => [o.name, o]));
  overrides.forEach((o, i) => {
    if (!o.reason || o.reason.trim() === '') {
      throw new VariableChoiceError(
        `variableOverrides[${i}].reason: the decision on the variable "${o.name}" needs a reason`,
        `variableOverrides[${i}].reason`,
      );
    }
  });
  const decisions = new Map<string, VariableDecision>();
  for (const name of names) {
    const o = forced.get(name);
    decisions.set(name, {
      name,
      verdict: o ? (o.include ? 'forced-in' : 'forced-out') : 'kept',
      reasons: o ? [`${o.include ? 'kept' : 'left out'} by the engineer: ${o.reason}`] : [],
    });
  }
  let active = names.filter((name) => forced.get(name)?.include !== false);
  for (;;) {
    const choice = chooseShape(periods, options, active);
    const selected = choice.candidates.find((c) => c.model === choice.selected)!;
    const fit = selected.fit!;
    const dof = fit.n - fit.p;
    const tCritical = twoSidedTCritical(1 - alpha, dof);
    const form = choice.settings.temperatureForm;
    const tests = active.map((name) => {
      const coefficient = fit.coefficients.find((c) => c.name === name)!;
      const t = coefficient.tStatAdjusted ?? coefficient.tStat;
      const without = fitShape(
        periods,
        fit.model,
        minPoints,
        form,
        active.filter((other) => other !== name),
      );
      const f = without.ok && fit.sse > 0 ? (without.sse - fit.sse) / (fit.sse / dof) : Number.NaN;
      const pValue = Number.isFinite(f) ? fPValue(Math.max(0, f), 1, dof) : Number.NaN;
      const fCrit = fCritical(alpha, 1, dof);
      const passes = Math.abs(t) >= tCritical && pValue < alpha;
      const words =
        `in the ${fit.model}: coefficient ${formatNumber(coefficient.estimate)} per unit per day, |t| = ${Math.abs(t).toFixed(2)} ${Math.abs(t) >= tCritical ? '≥' : '<'} ${tCritical.toFixed(2)}` +
        `; partial F = ${formatNumber(f)} ${pValue < alpha ? '>' : '≤'} ${fCrit.toFixed(2)} (1, ${dof} degrees of freedom; p ${formatP(pValue)}; α = ${alpha})`;
      return { name, t, f, pValue, passes, words };
    });
    const failing = tests
      .filter((test) => !test.passes && forced.get(test.name)?.include !== true)
      .sort((a, b) => Math.abs(a.t) - Math.abs(b.t));
    const weakest = failing[0];
    if (!weakest) {
      for (const test of tests) {
        const decision = decisions.get(test.name)!;
        decision.tStat = test.t;
        decision.partialF = test.f;
        decision.pValue = test.pValue;
        decision.reasons.push(
          decision.verdict === 'forced-in'
            ? `${test.passes ? 'also earns its place' : 'would not earn its place on the tests'} ${test.words}`
            : `earns its place ${test.words}`,
        );
      }
      return { ...choice, variables: [...active], variableDecisions: names.map((name) => decisions.get(name)!) };
    }
    const decision = decisions.get(weakest.name)!;
    decision.verdict = 'dropped';
    decision.tStat = weakest.t;
    decision.partialF = weakest.f;
    decision.pValue = weakest.pValue;
    decision.reasons.push(`dropped: does not earn its place ${weakest.words}`);
    active = active.filter((name) => name !== weakest.name);
  }
}

/** Fit every shape with the given variables and choose one. */
function chooseShape(
  periods: readonly Period[],
  options: SelectionOptions,
  variables: readonly string[],
): BaselineChoice {
  const alpha = options.significanceLevel ?? DEFAULT_SIGNIFICANCE_LEVEL;
  const minPoints = options.minPointsPerSegment ?? DEFAULT_MIN_POINTS_PER_SEGMENT;
  const limits: Guideline14Limits = { ...DEFAULT_GUIDELINE14_LIMITS, ...options.guideline14 };
  if (!isUsableSignificanceLevel(alpha))
    throw new RangeError(`significanceLevel must lie in (0, 1) with 1 − α below 1 in double precision, got ${alpha}`);
  if (!Number.isInteger(minPoints) || minPoints < 1)
    throw new RangeError(`minPointsPerSegment must be a positive integer, got ${minPoints}`);
  if (periods.length < MIN_BASELINE_PERIODS)
    throw new TooFewPeriodsError('baseline', MIN_BASELINE_PERIODS, periods.length, []);

  const models = (options.models ?? MODEL_NAMES).includes('1P')
    ? (options.models ?? MODEL_NAMES)
    : ['1P' as const, ...(options.models ?? [])];
  const form = resolveTemperatureForm(periods, options.temperatureForm);
  const rules: ScreeningRules = { alpha, minPoints, allowSameSignFourPoint: options.allowSameSignFourPoint ?? false };
  const fitted = models.map((model) => fitShape(periods, model, minPoints, form, variables));
  // The noise's own persistence, for every candidate's tests: the residual autocorrelation of the
  // best-fitting shape, the most flexible one (5P) included even when it is not a candidate, so
  // that a restricted candidate's misfit is not read as noise.
  const flexible = models.includes('5P') ? [] : [fitShape(periods, '5P', minPoints, form, variables)];
  const best = [...fitted, ...flexible].filter((f): f is ShapeFit => f.ok).sort((a, b) => a.sse - b.sse)[0];
  const noiseAutocorrelation = best ? best.stats.autocorrelation : 0;
  const candidates = fitted.map((result) =>
    screen(result.ok ? withAutocorrelation(result, periods, noiseAutocorrelation) : result, rules, limits),
  );

  const context: ChoiceContext = {
    days: searchView(periods, form, variables),
    minPoints,
    inflation: (fit) => fit.varianceInflation ?? [],
  };
  const current = selectShape(candidates, context, alpha);
  for (const c of candidates) {
    if (c.accepted) c.verdict = c === current ? 'selected' : 'accepted';
    if (c.fit && c.model !== '1P') c.reasons.push(`AICc ${formatNumber(c.aicc ?? Number.NaN)} (for information)`);
  }
  return {
    selected: current.model,
    candidates,
    settings: { significanceLevel: alpha, minPointsPerSegment: minPoints, guideline14: limits, temperatureForm: form },
  };
}

/**
 * Step 2: the sequence of tests from the mean model up (see the module
 * comment); every tested candidate is told why it was or was not taken.
 */
function selectShape(candidates: Candidate[], context: ChoiceContext, alpha: number): Candidate {
  const byModel = (model: ModelName): Candidate | undefined => candidates.find((c) => c.model === model);
  const screened = (model: ModelName): Candidate | undefined => {
    const candidate = byModel(model);
    return candidate?.accepted ? candidate : undefined;
  };
  const mean = byModel('1P')!;
  const fitOf = (model: ModelName): ShapeFit | null => byModel(model)?.fit ?? null;
  const record = (candidate: Candidate, test: ChoiceTest | null, against: string): boolean => {
    if (!test) {
      candidate.reasons.push(`cannot be tested against ${against}: no degrees of freedom left`);
      return false;
    }
    const passes = test.pValue < alpha;
    candidate.reasons.push(`${passes ? 'improves' : 'does not improve enough'} ${test.text} (α = ${alpha})`);
    return passes;
  };

  const gate = weatherDependenceTest(context, mean.fit!, {
    line: fitOf('2P'),
    heating: fitOf('3PH'),
    cooling: fitOf('3PC'),
    fourPoint: fitOf('4P'),
  });
  if (!gate || !(gate.pValue < alpha)) {
    mean.reasons.push(
      gate ? `no weather dependence: ${gate.text} (α = ${alpha})` : 'too few periods to test for weather dependence',
    );
    for (const model of ['2P', '3PC', '3PH', '4P', '5P'] as const) {
      const c = screened(model);
      if (c) c.reasons.push('not taken: the data show no weather dependence at level α (see 1P)');
    }
    return mean;
  }
  mean.reasons.push(`weather dependence: the mean model is rejected ${gate.text} (α = ${alpha})`);

  // One slope: 3PC or 3PH by the lower SSE, over the line only if the line bends.
  const threes = (['3PC', '3PH'] as const)
    .map(screened)
    .filter((c): c is Candidate => c !== undefined)
    .sort((a, b) => a.fit!.sse - b.fit!.sse);
  const three = threes[0];
  for (const other of threes.slice(1))
    other.reasons.push(
      `fits worse than ${three!.model} (SSE ${formatNumber(other.fit!.sse)} > ${formatNumber(three!.fit!.sse)})`,
    );
  const line = screened('2P');
  let current: Candidate | undefined;
  if (three && line) {
    const fourFit = fitOf('4P');
    const bends = fourFit ? bendTest(context, line.fit!, fourFit) : null;
    if (bends && bends.pValue < alpha) {
      three.reasons.push(`the line bends: the 4P's changepoint is significant ${bends.text} (α = ${alpha})`);
      line.reasons.push(`not taken: the relationship bends (see ${three.model})`);
      current = three;
    } else {
      three.reasons.push(
        bends
          ? `not taken: the line does not bend enough ${bends.text} (α = ${alpha})`
          : 'not taken: no bend could be tested',
      );
      current = line;
    }
  } else {
    current = three ?? line;
  }
  if (!current) {
    // Weather dependence, but no one-slope shape passed screening: the two-slope shapes in turn.
    current = screened('4P') ?? screened('5P');
    if (!current) {
      mean.reasons.push('no weather-dependent shape passed screening');
      return mean;
    }
    current.reasons.push('taken: weather dependence is significant and no one-slope shape passed screening');
    return current;
  }
  current.reasons.push(
    current.model === '2P'
      ? 'taken: weather dependence is significant'
      : `taken: weather dependence is significant and ${current.model} fits best of the one-slope shapes`,
  );
  if (current.model === '2P') {
    for (const model of ['4P', '5P'] as const)
      screened(model)?.reasons.push('not taken: the straight line does not bend (see 3PC/3PH)');
    return current;
  }

  const four = screened('4P');
  if (four && record(four, regularTest(context, current.fit!, four.fit!), current.model)) current = four;
  const five = screened('5P');
  if (five) {
    const test =
      current.model === '4P'
        ? regularTest(context, current.fit!, five.fit!)
        : secondBranchTest(context, current.fit!, five.fit!);
    if (record(five, test, current.model)) current = five;
  }
  return current;
}

interface ScreeningRules {
  alpha: number;
  minPoints: number;
  allowSameSignFourPoint: boolean;
}

function screen(result: ShapeFitResult, rules: ScreeningRules, limits: Guideline14Limits): Candidate {
  const { alpha, minPoints } = rules;
  if (!result.ok) {
    return {
      model: result.model,
      verdict: 'not-fitted',
      accepted: false,
      reasons: [`could not be fitted: ${result.reason}`],
      n: result.n,
      p: result.p,
      fit: null,
      aicc: null,
      overFitted: false,
      guideline14: null,
    };
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
    reasons.push(
      `heating slope has the wrong sign: ${formatNumber(heating)} per degree (use must rise as it gets colder)`,
    );
  }
  if (cooling !== undefined && !(cooling > 0)) {
    reasons.push(
      `cooling slope has the wrong sign: ${formatNumber(cooling)} per degree (use must rise as it gets warmer)`,
    );
  }
  if (fit.model === '4P') {
    const below = fit.parameters.slopeBelow!;
    const above = fit.parameters.slopeAbove!;
    if (!(below < above)) {
      reasons.push(
        `bends the wrong way: slope below the changepoint (${formatNumber(below)}) is not lower than above it (${formatNumber(above)})`,
      );
    } else if (!rules.allowSameSignFourPoint && !(below < 0 && above > 0)) {
      reasons.push(
        `both slopes are ${above <= 0 ? 'heating' : 'cooling'} slopes (${formatNumber(below)} and ${formatNumber(above)}): one branch with a rounded knee, as bill averaging makes it, is left to ${above <= 0 ? '3PH' : '3PC'}`,
      );
    }
  }
  if (fit.model === '5P' && !(fit.changepoints.heating! < fit.changepoints.cooling!)) {
    reasons.push('heating and cooling changepoints coincide: no flat band (a 4P shape)');
  }

  // Significance of every slope, with the residuals' autocorrelation allowed for.
  for (const c of fit.coefficients) {
    const words = slopeWords[c.name];
    if (!words) continue;
    const t = Math.abs(coefficient(c.name).tStatAdjusted ?? coefficient(c.name).tStat);
    if (!(t >= tCritical)) {
      const adjusted =
        t !== Math.abs(c.tStat)
          ? `; t adjusted for residual autocorrelation ρ = ${(fit.inflationAutocorrelation ?? 0).toFixed(2)} from ${Math.abs(c.tStat).toFixed(2)}`
          : '';
      reasons.push(
        `${words} not significant: |t| = ${t.toFixed(2)} < ${tCritical.toFixed(2)} (two-sided, α = ${alpha}, ${dof} degrees of freedom${adjusted})`,
      );
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
  const outOfSample = fit.stats.outOfSample;
  const overFitted = outOfSample !== undefined && outOfSample.cvrmse > OVERFIT_RATIO * fit.stats.cvrmse;
  if (overFitted) {
    reasons.push(
      `flagged as over-fitted: out-of-sample CV(RMSE) ${(outOfSample!.cvrmse * 100).toFixed(1)}% is ${(outOfSample!.cvrmse / fit.stats.cvrmse).toFixed(2)}× the in-sample ${(fit.stats.cvrmse * 100).toFixed(1)}% (${outOfSample!.method}; flagged above ${OVERFIT_RATIO}×)`,
    );
  }
  if (outOfSample?.unavailable) reasons.push(`no out-of-sample statistics: ${outOfSample.unavailable}`);
  return {
    model: fit.model,
    verdict: accepted ? 'accepted' : 'rejected',
    accepted,
    reasons,
    n: fit.n,
    p: fit.p,
    fit,
    aicc: aicc(fit),
    overFitted,
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

/**
 * The plain extra-sum-of-squares F-test of a richer shape against a simpler
 * one, degrees of freedom by parameter count. Not what the choice uses (see
 * choice-tests.ts: it is liberal for searched changepoints and for
 * autocorrelated residuals); kept for comparisons and the calibration
 * benchmark.
 */
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
