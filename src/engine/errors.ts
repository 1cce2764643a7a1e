/**
 * The engine's failures that are about the data, not about how it was
 * called: callers catch these by class to tell the user what to fix.
 * RangeError stays for misuse (an option out of range, a date that is not
 * ISO where the caller promised one).
 */
import type { ExcludedPeriod } from './types.js';

/** The fewest usable periods a baseline fit needs (a line through one point says nothing). */
export const MIN_BASELINE_PERIODS = 2;
/** The fewest usable periods a savings projection needs. */
export const MIN_REPORTING_PERIODS = 1;

/**
 * Fewer usable periods than a fit or a projection needs. Carries the periods
 * the alignment left out and why (empty when the caller passed periods
 * already aligned), so callers can name the rows to blame without aligning
 * again.
 */
export class TooFewPeriodsError extends Error {
  override readonly name = 'TooFewPeriodsError';

  constructor(
    readonly purpose: 'baseline' | 'savings',
    readonly needed: number,
    readonly usable: number,
    readonly excluded: readonly ExcludedPeriod[],
  ) {
    super(
      purpose === 'baseline'
        ? `at least ${needed} usable periods are needed to fit a baseline, got ${usable}`
        : 'no reporting periods to compute savings for',
    );
  }
}

/** A non-routine adjustment that cannot be applied as stored: which one, which field, and why. */
export class InvalidAdjustmentError extends Error {
  override readonly name = 'InvalidAdjustmentError';

  constructor(
    readonly adjustmentId: string,
    readonly field: 'quantity' | 'perDay' | 'uncertainty' | 'start' | 'end',
    readonly reason: string,
  ) {
    super(`adjustment ${adjustmentId}: ${reason}`);
  }
}

/**
 * A station's record too thin to build a normal year from: the calendar days
 * (MM-DD) with fewer than `needed` of the years asked for.
 */
export class ShortHistoryError extends Error {
  override readonly name = 'ShortHistoryError';

  constructor(
    readonly shortDays: readonly string[],
    readonly needed: number,
    readonly years: { from: number; to: number },
  ) {
    const listed = shortDays.slice(0, 10).join(', ');
    const more = shortDays.length > 10 ? ` and ${shortDays.length - 10} more` : '';
    super(
      `calendar days with fewer than ${needed} of the ${years.to - years.from + 1} years ${years.from}–${years.to} on record: ${listed}${more} (fill the gaps, or choose other years)`,
    );
  }
}

/** An engineer's exclusion that cannot be applied: the field at fault (exclusions[i], exclusions[i].reason or exclusions) and why. */
export class ExclusionError extends Error {
  override readonly name = 'ExclusionError';

  constructor(
    message: string,
    readonly field: string,
  ) {
    super(message);
  }
}

/**
 * Periods without a value of a variable the model uses: never assumed, the
 * caller names the dates. `periods` lists each such period once, in order.
 */
export class MissingVariableValuesError extends Error {
  override readonly name = 'MissingVariableValuesError';

  constructor(
    readonly purpose: 'baseline' | 'savings',
    readonly variables: readonly string[],
    readonly periods: readonly { start: string; end: string; missing: readonly string[] }[],
  ) {
    const listed = periods
      .slice(0, 10)
      .map((p) => `${p.start} to ${p.end} (${p.missing.join(', ')})`)
      .join('; ');
    const more = periods.length > 10 ? ` and ${periods.length - 10} more` : '';
    super(
      purpose === 'savings'
        ? `the baseline model uses the variables ${variables.join(', ')}; no values for the reporting periods ${listed}${more}: savings are not computed without them`
        : `a model with the variables ${variables.join(', ')} needs every baseline period's values; missing for ${listed}${more}`,
    );
  }
}

/** An engineer's decision on a variable (forced in or out) that cannot be used: which one and why. */
export class VariableChoiceError extends Error {
  override readonly name = 'VariableChoiceError';

  constructor(
    message: string,
    readonly field: string,
  ) {
    super(message);
  }
}
