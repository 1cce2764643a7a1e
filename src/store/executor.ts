/** What a query runs on: the database itself or an open transaction. Declared once for every layer that queries. */
import type { Kysely, Transaction } from 'kysely';
import type { Database } from './schema.js';

export type Executor = Kysely<Database> | Transaction<Database>;
