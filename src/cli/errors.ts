/**
 * Failures the user can fix, each told in one line. Anything else that
 * escapes a command is an internal error (exit code 1).
 */

/** Exit code for bad usage or bad input: the user can fix it. */
export const EXIT_BAD_INPUT = 2;
/** Exit code for an unexpected internal failure. */
export const EXIT_INTERNAL = 1;

/** A problem with the command line (unknown option, bad value). */
export class UsageError extends Error {
  override name = 'UsageError';
}

export { InputFileError } from '../lib/csv/input-error.js';

/** Keep a message on one line, whatever the engine or the system put in it. */
export function oneLine(text: string): string {
  return text.replace(/\s*[\r\n]+\s*/g, ' ').trim();
}
