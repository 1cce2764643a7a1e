/**
 * What an open database is to the rest of the code: the kysely handle, its
 * dialect, where it lives (for messages), and the faults it survived.
 */
import type { Kysely } from 'kysely';
import type { Database } from './schema.js';
import type { DatabaseFault } from './faults.js';

export type Dialect = 'sqlite' | 'postgres';

export interface Store {
  db: Kysely<Database>;
  dialect: Dialect;
  /** Where the data lives, for messages (never contains a password). */
  location: string;
  close(): Promise<void>;
}

/** What the store reports about database faults it survived (a dropped connection, a retried read). */
export interface StoreEvent {
  event: 'connection-error' | 'read-retried' | 'transaction-start-retried';
  fault: DatabaseFault | null;
  code?: string;
  message: string;
}

export interface StoreOptions {
  /** Told of every database fault the store survives; for the log. Never given a secret. */
  onEvent?: (event: StoreEvent) => void;
}
