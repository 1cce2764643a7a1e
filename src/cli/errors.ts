/**
 * Failures the user can fix, each told in one line. Anything else that
 * escapes a command is an internal error (exit code 1).
 */
import type { DomainErrorKind } from '../domain/errors.js';

/** Exit code for bad usage or bad input: the user can fix it. */
export const EXIT_BAD_INPUT = 2;
/** Exit code for an unexpected internal failure. */
export const EXIT_INTERNAL = 1;
/** Exit code when the database cannot serve the command right now: run it again later. */
export const EXIT_UNAVAILABLE = 3;

/**
 * The exit code of a ledger rule's refusal: the user can fix every kind but
 * an unavailable database, which is retried.
 */
export const EXIT_CODE_OF: Readonly<Record<DomainErrorKind, number>> = {
  invalid: EXIT_BAD_INPUT,
  'not-found': EXIT_BAD_INPUT,
  conflict: EXIT_BAD_INPUT,
  frozen: EXIT_BAD_INPUT,
  unprocessable: EXIT_BAD_INPUT,
  unauthorized: EXIT_BAD_INPUT,
  forbidden: EXIT_BAD_INPUT,
  unavailable: EXIT_UNAVAILABLE,
};

/** A problem with the command line (unknown option, bad value). */
export class UsageError extends Error {
  override name = 'UsageError';
}

export { InputFileError } from '../lib/csv/input-error.js';

/** Keep a message on one line, whatever the engine or the system put in it. */
export function oneLine(text: string): string {
  return text.replace(/\s*[\r\n]+\s*/g, ' ').trim();
}

/** A node:util parseArgs failure in plain words (unknown option, unexpected argument, missing value). */
export function describeParseError(error: unknown): string {
  const code = (error as { code?: unknown })?.code;
  const message = error instanceof Error ? error.message : String(error);
  const quoted = /'([^']+)'/.exec(message)?.[1];
  switch (code) {
    case 'ERR_PARSE_ARGS_UNKNOWN_OPTION':
      return `unknown option ${quoted ?? ''}`.trim();
    case 'ERR_PARSE_ARGS_UNEXPECTED_POSITIONAL':
      return `unexpected argument ${quoted ?? ''}`.trim();
    case 'ERR_PARSE_ARGS_INVALID_OPTION_VALUE':
      return quoted ? `option ${quoted.replace(/ <value>$/, '')} needs a value` : oneLine(message);
    default:
      return oneLine(message.split('\n')[0] ?? message);
  }
}
