/** Domain errors: the one-line summary and the kinds each transport maps. Check values: hand-worked strings. */
import { describe, expect, it } from 'vitest';
import { andMore, DomainError, fieldErrors, summarise, type DomainErrorKind } from '../../src/domain/errors.js';
import { problemFromDomain } from '../../src/http/problem.js';
import { EXIT_BAD_INPUT, EXIT_CODE_OF, EXIT_UNAVAILABLE } from '../../src/cli/errors.js';

describe('the first error and how many follow', () => {
  it('names the first and counts the rest', () => {
    const errors = [
      { field: 'rates[1].from', message: 'gap' },
      { field: 'rates[2].from', message: 'overlap' },
    ];
    expect(summarise(errors)).toBe('rates[1].from: gap (and 1 more)'); // hand-worked
    expect(summarise(errors.slice(0, 1))).toBe('rates[1].from: gap'); // hand-worked: one error, no count
    expect(summarise(errors, 250)).toBe('rates[1].from: gap (and 249 more)'); // hand-worked: counted beyond the listed
    expect(andMore(7, 5)).toBe(' (and 2 more)'); // hand-worked: five named in the detail
  });

  it('lists at most the limit but counts them all', () => {
    const errors = Array.from({ length: 5 }, (_, i) => ({ field: `days[${i}]`, message: 'bad' }));
    const error = fieldErrors('invalid', errors, 2);
    expect(error.detail).toBe('days[0]: bad (and 4 more)'); // hand-worked
    expect(error.errors).toHaveLength(2);
  });
});

describe('every kind has a problem status and an exit code', () => {
  const kinds: DomainErrorKind[] = [
    'invalid',
    'not-found',
    'conflict',
    'frozen',
    'unprocessable',
    'unauthorized',
    'forbidden',
    'unavailable',
  ];
  // The statuses of RFC 9110 §15 the API has always answered with (src/http/problem.ts).
  const STATUS: Record<DomainErrorKind, number> = {
    invalid: 400,
    'not-found': 404,
    conflict: 409,
    frozen: 409,
    unprocessable: 422,
    unauthorized: 401,
    forbidden: 403,
    unavailable: 503,
  };
  it.each(kinds)('%s', (kind) => {
    const problem = problemFromDomain(new DomainError(kind, 'x: y', [{ field: 'x', message: 'y' }], { fact: 1 }));
    expect(problem.status).toBe(STATUS[kind]);
    expect(problem.body()).toMatchObject({ detail: 'x: y', errors: [{ field: 'x', message: 'y' }], fact: 1 });
    expect(EXIT_CODE_OF[kind]).toBe(kind === 'unavailable' ? EXIT_UNAVAILABLE : EXIT_BAD_INPUT); // the CLI's contract: 2 fixable, 3 retry
  });
});
