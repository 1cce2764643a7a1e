/**
 * RFC 9457 problem details: every error the API returns is
 * application/problem+json with a stable `type`, a human `title`, a `detail`
 * naming the field or row, and for validation errors an `errors` list.
 */
import type { DomainError, DomainErrorKind, FieldError } from '../domain/errors.js';

export type { FieldError };

export type ProblemKind =
  | 'validation'
  | 'unauthorized'
  | 'forbidden'
  | 'not-found'
  | 'conflict'
  | 'frozen'
  | 'idempotency-mismatch'
  | 'idempotency-in-flight'
  | 'unsupported-media-type'
  | 'payload-too-large'
  | 'unprocessable'
  | 'rate-limited'
  | 'unavailable'
  | 'internal';

const TITLES: Record<ProblemKind, [number, string]> = {
  validation: [400, 'The request is not valid'],
  unauthorized: [401, 'A valid API key is required'],
  forbidden: [403, 'This key may not do that'],
  'not-found': [404, 'Not found'],
  conflict: [409, 'Conflicts with what is stored'],
  frozen: [409, 'A frozen baseline cannot be changed'],
  'idempotency-mismatch': [422, 'Idempotency-Key reused with a different request'],
  'idempotency-in-flight': [409, 'A request with this Idempotency-Key is still in progress'],
  'unsupported-media-type': [415, 'Unsupported content type'],
  'payload-too-large': [413, 'Request body too large'],
  unprocessable: [422, 'The request cannot be carried out on the stored data'],
  'rate-limited': [429, 'Too many requests'],
  unavailable: [503, 'Not available right now'],
  internal: [500, 'Internal error'],
};

export const PROBLEM_CONTENT_TYPE = 'application/problem+json';

export class Problem extends Error {
  readonly status: number;
  readonly title: string;
  readonly type: string;

  constructor(
    readonly kind: ProblemKind,
    readonly detail: string,
    readonly errors?: FieldError[],
    readonly extra?: Record<string, unknown>,
  ) {
    super(detail);
    const [status, title] = TITLES[kind];
    this.status = status;
    this.title = title;
    this.type = `urn:mvledger:problem:${kind}`;
  }

  body(instance?: string): ProblemBody {
    return {
      type: this.type,
      title: this.title,
      status: this.status,
      detail: this.detail,
      ...(instance ? { instance } : {}),
      ...(this.errors?.length ? { errors: this.errors } : {}),
      ...this.extra,
    };
  }
}

export interface ProblemBody {
  type: string;
  title: string;
  status: number;
  detail: string;
  instance?: string;
  errors?: FieldError[];
  [key: string]: unknown;
}

/** The problem kind of each domain error kind: the same name, except that invalid requests are `validation`. */
const PROBLEM_OF: Record<DomainErrorKind, ProblemKind> = {
  invalid: 'validation',
  'not-found': 'not-found',
  conflict: 'conflict',
  frozen: 'frozen',
  unprocessable: 'unprocessable',
  unauthorized: 'unauthorized',
  forbidden: 'forbidden',
  unavailable: 'unavailable',
};

/** The problem+json a domain error leaves as: its kind's status and title, its detail, field errors and facts. */
export function problemFromDomain(error: DomainError): Problem {
  return new Problem(
    PROBLEM_OF[error.kind],
    error.detail,
    error.errors ? [...error.errors] : undefined,
    error.facts ? { ...error.facts } : undefined,
  );
}
