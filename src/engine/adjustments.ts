/**
 * Non-routine adjustments: changes to the adjusted baseline for events the
 * baseline model does not know about (a wing closed for refurbishment, a new
 * production line), each with its dates and reason, as IPMVP requires them
 * to be documented. A positive adjustment adds to the adjusted baseline
 * (the facility would have used more without the measures); a negative one
 * takes away from it.
 */
import { parseIsoDate, dayNumber } from './dates.js';
import { combineInQuadrature } from './rollup.js';
import { InvalidAdjustmentError } from './errors.js';
import { beyondBoundPerDay, MAX_USE_PER_DAY } from './bounds.js';

/**
 * One non-routine adjustment over [start, end). Exactly one of `quantity`
 * and `perDay` is non-null: `quantity` is a total spread evenly over the
 * days of [start, end); `perDay` applies to every day.
 */
export interface NonRoutineAdjustment {
  id: string;
  start: string;
  end: string;
  quantity: number | null;
  perDay: number | null;
  reason: string;
  /**
   * The engineer's standard uncertainty (one standard deviation) of the
   * adjustment's total over [start, end), in the meter's unit; absent or
   * null when none was stated (the figure is then taken as exact).
   */
  uncertainty?: number | null;
}

/**
 * The adjustment per day: `perDay`, or `quantity` / days. Throws
 * InvalidAdjustmentError when both or neither are set, the amount is not
 * finite, a date is not ISO, or end ≤ start.
 */
export function adjustmentPerDay(a: NonRoutineAdjustment): number {
  const days = spanDays(a);
  const amount = amountOf(a);
  return amount.kind === 'perDay' ? amount.value : amount.value / days;
}

/**
 * What is wrong with an adjustment as the engine would apply it (the rules
 * the API checks on the way in: exactly one of quantity and perDay, finite,
 * within the use-per-day bound, ISO dates with end after start, an
 * uncertainty of at least 0), or null. For data brought in another way
 * (an import) before it is stored.
 */
export function checkAdjustment(a: NonRoutineAdjustment): InvalidAdjustmentError | null {
  try {
    spanDays(a);
    const amount = amountOf(a);
    statedUncertainty(a);
    // perDay is bounded as it stands (the API's bound); a total by its share per day. Never perDay × days: rounding at the edge.
    const beyond =
      amount.kind === 'perDay'
        ? Math.abs(amount.value) > MAX_USE_PER_DAY.max
          ? `beyond ±${MAX_USE_PER_DAY.max} ${MAX_USE_PER_DAY.per}`
          : null
        : beyondBoundPerDay(amount.value, a.start, a.end, MAX_USE_PER_DAY);
    if (beyond) return new InvalidAdjustmentError(a.id, amount.kind, beyond);
    const beyondUncertainty =
      a.uncertainty == null ? null : beyondBoundPerDay(a.uncertainty, a.start, a.end, MAX_USE_PER_DAY);
    if (beyondUncertainty) return new InvalidAdjustmentError(a.id, 'uncertainty', beyondUncertainty);
    return null;
  } catch (error) {
    if (error instanceof InvalidAdjustmentError) return error;
    throw error;
  }
}

/** Days that two [start, end) spans have in common (0 when disjoint). */
export function adjustmentOverlap(a: { start: string; end: string }, b: { start: string; end: string }): number {
  const start = Math.max(dayNumber(a.start), dayNumber(b.start));
  const end = Math.min(dayNumber(a.end), dayNumber(b.end));
  return Math.max(end - start, 0);
}

/**
 * The total adjustment falling in [start, end): Σ perDay × days in common.
 * Throws InvalidAdjustmentError as adjustmentPerDay does for a malformed adjustment.
 */
export function adjustmentsForPeriod(adjustments: readonly NonRoutineAdjustment[], start: string, end: string): number {
  const period = { start, end };
  let total = 0;
  for (const adjustment of adjustments) {
    const days = spanDays(adjustment);
    const amount = amountOf(adjustment);
    const overlap = adjustmentOverlap(adjustment, period);
    if (overlap === 0) continue;
    // quantity × overlap / days rather than (quantity / days) × overlap: a
    // period holding the whole adjustment gets back exactly its quantity.
    total += amount.kind === 'perDay' ? amount.value * overlap : (amount.value * overlap) / days;
  }
  return total;
}

/**
 * The standard uncertainty of the part of one adjustment that falls in the
 * periods: its stated uncertainty × (days in the periods / its days). An
 * estimated total has one error, shared by its days, so a part carries that
 * share of it (not the square root of the share, as independent daily
 * errors would). The periods must not overlap one another. Throws
 * InvalidAdjustmentError for a malformed adjustment or an uncertainty that is negative
 * or not finite.
 */
export function adjustmentUncertaintyInPeriods(
  adjustment: NonRoutineAdjustment,
  periods: readonly { start: string; end: string }[],
): number {
  const days = spanDays(adjustment);
  const stated = statedUncertainty(adjustment);
  if (stated === 0) return 0;
  const inside = periods.reduce((sum, period) => sum + adjustmentOverlap(adjustment, period), 0);
  return (stated * inside) / days;
}

/**
 * The combined standard uncertainty of the adjustments falling in the
 * periods: each one's part (adjustmentUncertaintyInPeriods) combined in
 * quadrature, the adjustments' errors taken as independent of one another.
 */
export function adjustmentsUncertaintyInPeriods(
  adjustments: readonly NonRoutineAdjustment[],
  periods: readonly { start: string; end: string }[],
): number {
  return combineInQuadrature(adjustments.map((adjustment) => adjustmentUncertaintyInPeriods(adjustment, periods)));
}

/** The first of `existing` sharing at least one day with `candidate`, or undefined. */
export function findOverlappingAdjustment<T extends { start: string; end: string }>(
  existing: readonly T[],
  candidate: { start: string; end: string },
): T | undefined {
  return existing.find((item) => adjustmentOverlap(item, candidate) > 0);
}

function amountOf(a: NonRoutineAdjustment): { kind: 'quantity' | 'perDay'; value: number } {
  if ((a.quantity === null) === (a.perDay === null)) {
    throw new InvalidAdjustmentError(a.id, 'quantity', 'exactly one of quantity and perDay must be set');
  }
  const amount =
    a.quantity !== null
      ? { kind: 'quantity' as const, value: a.quantity }
      : { kind: 'perDay' as const, value: a.perDay! };
  if (!Number.isFinite(amount.value))
    throw new InvalidAdjustmentError(a.id, amount.kind, `${amount.kind} is not a finite number`);
  return amount;
}

function statedUncertainty(a: NonRoutineAdjustment): number {
  const value = a.uncertainty ?? 0;
  if (!(Number.isFinite(value) && value >= 0))
    throw new InvalidAdjustmentError(
      a.id,
      'uncertainty',
      `uncertainty must be a finite number of at least 0, got ${value}`,
    );
  return value;
}

function spanDays(a: NonRoutineAdjustment): number {
  const start = parseIsoDate(a.start);
  const end = parseIsoDate(a.end);
  if (start === null)
    throw new InvalidAdjustmentError(a.id, 'start', `start is not an ISO date: ${JSON.stringify(a.start)}`);
  if (end === null) throw new InvalidAdjustmentError(a.id, 'end', `end is not an ISO date: ${JSON.stringify(a.end)}`);
  const days = end - start;
  if (days <= 0) throw new InvalidAdjustmentError(a.id, 'end', `end ${a.end} is not after start ${a.start}`);
  return days;
}
