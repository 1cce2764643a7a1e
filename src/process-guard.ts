/**
 * Process-level handlers of the service (installed by src/server.ts once it
 * runs). Kept apart from the server so they can be tried in a bare process.
 */
import type { FastifyBaseLogger } from 'fastify';
import { databaseFault, faultRecord } from './store/faults.js';

/**
 * The last line of defence: a database fault that escapes every handler
 * (an error event or a rejected promise nobody awaits) is logged, and the
 * process goes on serving; the database's return is seen by the next
 * request. Anything else still ends the process, as Node would.
 */
export function keepRunningThroughDatabaseFaults(log: Pick<FastifyBaseLogger, 'warn' | 'fatal'>): void {
  process.on('unhandledRejection', (reason) => {
    if (databaseFault(reason) === null) throw reason;
    log.warn({ database: faultRecord(reason) }, 'database fault in a promise nobody awaited: ignored');
  });
  process.on('uncaughtException', (error) => {
    if (databaseFault(error) !== null) {
      log.warn({ database: faultRecord(error) }, 'database fault outside a request: ignored');
      return;
    }
    // Anything can be thrown (a rejection re-thrown above may not be an Error).
    const described =
      error instanceof Error
        ? { type: error.name, message: error.message }
        : { type: typeof error, message: String(error) };
    log.fatal({ err: described }, 'uncaught exception: stopping');
    process.exit(1);
  });
}
