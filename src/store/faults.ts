/**
 * Database faults the service answers instead of failing on: the one place
 * that says which errors mean "the database is not available right now"
 * (the HTTP layer answers them 503 with Retry-After, the store retries a
 * read once, the process logs them and carries on).
 *
 *  - busy: SQLite held by another writer past the busy timeout;
 *  - connection-lost: an open connection died (the server terminated the
 *    backend, restarted, failed over, or the socket broke);
 *  - unreachable: no connection can be made (refused, timed out, the
 *    server is starting up or shutting down).
 *
 * PostgreSQL SQLSTATE codes from the PostgreSQL documentation, Appendix A
 * (class 08 connection exception; 57P01 admin_shutdown, 57P02
 * crash_shutdown, 57P03 cannot_connect_now; 53300 too_many_connections);
 * the pg client's own messages and Node's socket error codes (common
 * practice, no published list).
 */

export type DatabaseFault = 'busy' | 'connection-lost' | 'unreachable';

/** SQLSTATEs of a connection that is gone or never came. */
const CONNECTION_LOST_STATES = new Set(['57P01', '57P02', '08003', '08006', '08007', '08P01', '08000']);
const UNREACHABLE_STATES = new Set(['57P03', '08001', '08004', '53300']);

/** Socket errors of Node (errno codes). */
const CONNECTION_LOST_ERRNOS = new Set(['ECONNRESET', 'EPIPE', 'ECONNABORTED']);
const UNREACHABLE_ERRNOS = new Set([
  'ECONNREFUSED',
  'ETIMEDOUT',
  'EHOSTUNREACH',
  'ENETUNREACH',
  'ENOTFOUND',
  'EAI_AGAIN',
]);

/** Messages of the pg client and pool, which carry no code. */
const CONNECTION_LOST_MESSAGES = [
  /^Connection terminated/,
  /is not queryable/,
  /^Postgres connection has been discarded/,
  /terminating connection/,
];
const UNREACHABLE_MESSAGES = [
  /^timeout exceeded when trying to connect/,
  /^Connection terminated due to connection timeout/,
  /the database system is (starting up|shutting down|in recovery mode)/,
];

/**
 * The kind of database fault `error` is (looking through `cause` as well),
 * or null for any other error: a constraint violation, a bad query or a
 * bug is not a fault of availability and must not be retried or hidden.
 */
export function databaseFault(error: unknown, depth = 0): DatabaseFault | null {
  if (!(error instanceof Error) || depth > 5) return null;
  const found = faultOf(error);
  if (found) return found;
  // A host name with several addresses fails as one AggregateError of the attempts.
  if (error instanceof AggregateError) {
    for (const inner of error.errors) {
      const fault = databaseFault(inner, depth + 1);
      if (fault) return fault;
    }
  }
  return databaseFault(error.cause, depth + 1);
}

function faultOf(error: Error): DatabaseFault | null {
  const code = (error as { code?: unknown }).code;
  if (typeof code === 'string') {
    if (code.startsWith('SQLITE_BUSY') || code.startsWith('SQLITE_LOCKED')) return 'busy';
    if (UNREACHABLE_STATES.has(code) || UNREACHABLE_ERRNOS.has(code)) return 'unreachable';
    if (CONNECTION_LOST_STATES.has(code) || CONNECTION_LOST_ERRNOS.has(code)) return 'connection-lost';
  }
  // Timeouts first: "Connection terminated due to connection timeout" is a connection never made.
  if (UNREACHABLE_MESSAGES.some((pattern) => pattern.test(error.message))) return 'unreachable';
  if (CONNECTION_LOST_MESSAGES.some((pattern) => pattern.test(error.message))) return 'connection-lost';
  return null;
}

/** A fault as a log record: its kind, code and a short message; never a connection string or a stack. */
export function faultRecord(error: unknown): { fault: DatabaseFault | null; code?: string; message: string } {
  const raw = error instanceof Error ? (error as { code?: unknown }).code : undefined;
  const code = typeof raw === 'string' ? raw : undefined;
  const message = (error instanceof Error ? error.message : String(error))
    .replace(/\w+:\/\/\S+/g, '(url)')
    .replace(/\s+/g, ' ')
    .slice(0, 200);
  return { fault: databaseFault(error), ...(code ? { code } : {}), message };
}
