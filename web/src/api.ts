/**
 * Calls to the service's own /v1 API with the key the user pasted. The key
 * lives in this tab's sessionStorage only: never in localStorage, a cookie or
 * a URL, so closing the tab forgets it.
 */

const KEY_SLOT = 'mvledger.apiKey';

export function storedKey(): string | null {
  return sessionStorage.getItem(KEY_SLOT);
}

export function storeKey(key: string): void {
  sessionStorage.setItem(KEY_SLOT, key);
}

export function forgetKey(): void {
  sessionStorage.removeItem(KEY_SLOT);
}

/** One field error of an RFC 9457 problem, e.g. { field: 'row 5, field end', message: '…' }. */
export interface FieldError {
  field: string;
  message: string;
}

export interface Problem {
  status: number;
  title: string;
  detail: string;
  errors: FieldError[];
}

export type Answer<T> = { ok: true; status: number; body: T } | { ok: false; status: number; problem: Problem };

export interface CallOptions {
  method?: 'GET' | 'POST' | 'PUT';
  json?: unknown;
  csv?: string;
  /** Read the body as text (CSV, HTML) rather than JSON. */
  text?: boolean;
}

function problemOf(status: number, body: unknown): Problem {
  const value = (body ?? {}) as Partial<Problem>;
  return {
    status,
    title: typeof value.title === 'string' ? value.title : `HTTP ${status}`,
    detail: typeof value.detail === 'string' ? value.detail : 'the service gave no detail',
    errors: Array.isArray(value.errors) ? value.errors : [],
  };
}

/** A request to the API; a refusal comes back as its problem, never thrown. */
export async function call<T>(path: string, options: CallOptions = {}): Promise<Answer<T>> {
  const headers: Record<string, string> = { accept: options.text ? '*/*' : 'application/json' };
  const key = storedKey();
  if (key) headers.authorization = `Bearer ${key}`;
  let body: string | undefined;
  if (options.json !== undefined) {
    headers['content-type'] = 'application/json';
    body = JSON.stringify(options.json);
  } else if (options.csv !== undefined) {
    headers['content-type'] = 'text/csv';
    body = options.csv;
  }
  let response: Response;
  try {
    response = await fetch(path, { method: options.method ?? 'GET', headers, body, cache: 'no-store' });
  } catch {
    return {
      ok: false,
      status: 0,
      problem: { status: 0, title: 'No answer', detail: 'the service did not answer', errors: [] },
    };
  }
  const raw = await response.text();
  if (!response.ok) {
    let parsed: unknown = null;
    try {
      parsed = JSON.parse(raw);
    } catch {
      parsed = null;
    }
    return { ok: false, status: response.status, problem: problemOf(response.status, parsed) };
  }
  return { ok: true, status: response.status, body: (options.text ? raw : raw === '' ? null : JSON.parse(raw)) as T };
}

/** A GET that must succeed for the screen to make sense: a refusal is thrown as ScreenError. */
export async function fetchOrThrow<T>(path: string): Promise<T> {
  const answer = await call<T>(path);
  if (!answer.ok) throw new ScreenError(answer.problem);
  return answer.body;
}

export class ScreenError extends Error {
  constructor(readonly problem: Problem) {
    super(problem.detail);
  }
}
