/**
 * Which errors are database faults (answered 503, a read retried once) and
 * which are not (a 500, never hidden). Check values: the SQLSTATE codes of
 * the PostgreSQL documentation, Appendix A (class 08 connection exception,
 * 57P01 admin_shutdown, 57P02 crash_shutdown, 57P03 cannot_connect_now,
 * 53300 too_many_connections); SQLite's SQLITE_BUSY result codes; the pg
 * client's own messages and Node's errno codes (common practice).
 */
import { describe, expect, it } from 'vitest';
import { databaseFault, faultRecord } from '../../src/store/faults.js';

const withCode = (code: string, message = 'failed') => Object.assign(new Error(message), { code });

describe('databaseFault', () => {
  it('names a lost connection', () => {
    expect(databaseFault(withCode('57P01', 'terminating connection due to administrator command'))).toBe(
      'connection-lost',
    );
    expect(databaseFault(withCode('57P02'))).toBe('connection-lost');
    expect(databaseFault(withCode('08006'))).toBe('connection-lost');
    expect(databaseFault(withCode('ECONNRESET'))).toBe('connection-lost');
    expect(databaseFault(new Error('Connection terminated unexpectedly'))).toBe('connection-lost');
    expect(databaseFault(new Error('Client has encountered a connection error and is not queryable'))).toBe(
      'connection-lost',
    );
  });

  it('names a database that cannot be reached', () => {
    expect(databaseFault(withCode('ECONNREFUSED', 'connect ECONNREFUSED 127.0.0.1:5432'))).toBe('unreachable');
    expect(databaseFault(withCode('57P03', 'the database system is shutting down'))).toBe('unreachable');
    expect(databaseFault(withCode('08001'))).toBe('unreachable');
    expect(databaseFault(withCode('53300'))).toBe('unreachable');
    expect(databaseFault(new Error('timeout exceeded when trying to connect'))).toBe('unreachable');
    expect(databaseFault(new Error('Connection terminated due to connection timeout'))).toBe('unreachable');
  });

  it('names a busy SQLite file', () => {
    expect(databaseFault(withCode('SQLITE_BUSY'))).toBe('busy');
    expect(databaseFault(withCode('SQLITE_BUSY_SNAPSHOT'))).toBe('busy');
  });

  it('looks through an error’s cause, and the attempts of an AggregateError', () => {
    expect(databaseFault(new Error('query failed', { cause: withCode('57P01') }))).toBe('connection-lost');
    // Node's connection to a name with an IPv6 and an IPv4 address fails as one AggregateError.
    expect(
      databaseFault(
        new AggregateError([
          withCode('ECONNREFUSED', 'connect ECONNREFUSED ::1:5432'),
          withCode('ECONNREFUSED', 'connect ECONNREFUSED 127.0.0.1:5432'),
        ]),
      ),
    ).toBe('unreachable');
  });

  it('leaves every other error alone', () => {
    expect(databaseFault(withCode('23505', 'duplicate key value violates unique constraint'))).toBeNull();
    expect(databaseFault(withCode('42601', 'syntax error at or near "selec"'))).toBeNull();
    expect(databaseFault(withCode('SQLITE_CONSTRAINT_UNIQUE'))).toBeNull();
    expect(databaseFault(new TypeError('x is undefined'))).toBeNull();
    expect(databaseFault('Connection terminated')).toBeNull(); // not an Error
    expect(databaseFault(undefined)).toBeNull();
  });

  it('makes log records without a connection string', () => {
    const record = faultRecord(
      withCode('28P01', 'password authentication failed for postgres://ledger:hunter2@db:5432/ledger'),
    );
    expect(record).toEqual({ fault: null, code: '28P01', message: 'password authentication failed for (url)' });
    expect(JSON.stringify(record)).not.toContain('hunter2');
  });
});
