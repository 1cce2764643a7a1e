/**
 * What goes wrong in the ledger's rules, said without any transport: the
 * services throw only DomainError; the HTTP layer maps each kind to a
 * problem+json status and the command line to an exit code and one line.
 */

/** One thing wrong, and where: a JSON path such as readings[3].end, or a CSV row such as row 4, field end. */
export interface FieldError {
  field: string;
  message: string;
}

/**
 * invalid: the request itself is wrong (a field, a row, a window).
 * not-found: no such record in the caller's organisation.
 * conflict: clashes with what is stored (an overlap, a record already withdrawn).
 * frozen: would change a frozen baseline.
 * unprocessable: well-formed, but the stored data cannot answer it (no frozen baseline, too few periods).
 * unauthorized / forbidden: no live key, or a role without the permission.
 * unavailable: the database cannot serve the request right now.
 */
export type DomainErrorKind =
  'invalid' | 'not-found' | 'conflict' | 'frozen' | 'unprocessable' | 'unauthorized' | 'forbidden' | 'unavailable';

/** At most this many field errors travel with one error; the detail counts them all. */
export const MAX_LISTED_ERRORS = 100;

export class DomainError extends Error {
  override readonly name = 'DomainError';

  /**
   * @param detail one line naming the field or row, as the user reads it.
   * @param errors every field at fault (the first is the one `detail` names).
   * @param facts machine-readable facts about the case (e.g. which baseline is frozen).
   */
  constructor(
    readonly kind: DomainErrorKind,
    readonly detail: string,
    readonly errors?: readonly FieldError[],
    readonly facts?: Readonly<Record<string, unknown>>,
  ) {
    super(detail);
  }
}

export const isDomainError = (error: unknown): error is DomainError => error instanceof DomainError;

/** "no such record": `${what} ${id} was not found`. */
export const notFound = (what: string, id: string): DomainError =>
  new DomainError('not-found', `${what} ${id} was not found`);

/** " (and 3 more)" after the first of `count` errors; empty for one. */
export function andMore(count: number, named = 1): string {
  return count > named ? ` (and ${count - named} more)` : '';
}

/** "field: message (and N more)": the first error, and how many follow it. */
export function summarise(errors: readonly FieldError[], count = errors.length): string {
  const first = errors[0]!;
  return `${first.field}: ${first.message}${andMore(count)}`;
}

/**
 * One error for a list of field errors: the detail names the first and counts
 * the rest; at most `limit` travel with it.
 */
export function fieldErrors(
  kind: DomainErrorKind,
  errors: readonly FieldError[],
  limit: number = errors.length,
): DomainError {
  return new DomainError(kind, summarise(errors), errors.slice(0, limit));
}
