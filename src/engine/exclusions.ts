/**
 * The engineer's exclusions: baseline readings left out of a fit on
 * purpose (a meter fault, an estimated read later corrected), each with its
 * reason on record. They are kept apart from the readings the weather's
 * coverage leaves out, and limited: more than a fifth of the baseline's
 * readings left out by hand is refused (a limit of our own; a baseline that
 * needs more is not the baseline the M&V plan described).
 */
import type { Reading } from './types.js';
import { ExclusionError } from './errors.js';

/** Largest share of the baseline's readings the engineer may leave out (our own limit). */
export const MAX_EXCLUDED_SHARE = 1 / 5;

/** One reading to leave out, named by its period, and why. */
export interface Exclusion {
  start: string;
  end: string;
  reason: string;
  /** The stored reading's id, when the caller knows it (the service does). */
  readingId?: string;
}

/** An exclusion as applied: the reading it matched and its quantity, for the record. */
export interface AppliedExclusion extends Exclusion {
  quantity: number;
}

/**
 * Leave the named readings out. Every exclusion must name exactly one
 * reading's period, once, with a reason; more than MAX_EXCLUDED_SHARE of the
 * readings is refused. Throws ExclusionError naming the field.
 */
export function applyExclusions(
  readings: readonly Reading[],
  exclusions: readonly Exclusion[],
): { kept: Reading[]; applied: AppliedExclusion[] } {
  if (exclusions.length === 0) return { kept: [...readings], applied: [] };
  const chosen = new Set<number>();
  const applied: AppliedExclusion[] = [];
  exclusions.forEach((exclusion, i) => {
    const name =
      exclusion.readingId !== undefined
        ? `reading ${exclusion.readingId}`
        : `the reading ${exclusion.start}..${exclusion.end}`;
    if (!exclusion.reason || exclusion.reason.trim() === '') {
      throw new ExclusionError(
        `exclusions[${i}].reason: leaving out ${name} needs a reason`,
        `exclusions[${i}].reason`,
      );
    }
    const index = readings.findIndex((r) => r.start === exclusion.start && r.end === exclusion.end);
    if (index < 0) {
      throw new ExclusionError(
        `exclusions[${i}]: no baseline reading ${exclusion.start}..${exclusion.end} (end exclusive) to leave out`,
        `exclusions[${i}]`,
      );
    }
    if (chosen.has(index)) throw new ExclusionError(`exclusions[${i}]: ${name} is left out twice`, `exclusions[${i}]`);
    chosen.add(index);
    applied.push({ ...exclusion, reason: exclusion.reason.trim(), quantity: readings[index]!.quantity });
  });
  if (chosen.size > readings.length * MAX_EXCLUDED_SHARE) {
    throw new ExclusionError(
      `exclusions: ${chosen.size} of the baseline's ${readings.length} readings would be left out by hand, more than a fifth (${Math.floor(readings.length * MAX_EXCLUDED_SHARE)} at most); a baseline that needs more is not the one the M&V plan describes`,
      'exclusions',
    );
  }
  return { kept: readings.filter((_, index) => !chosen.has(index)), applied };
}
