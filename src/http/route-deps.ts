/**
 * What every route module receives from the app. Its own module, so routes
 * import it without importing app.ts (which imports the routes).
 */
import type { Store } from '../store/connect.js';
import type { SavingsCache } from '../services/savings-cache.js';
import type { CheckpointSigner } from '../lib/checkpoint-signature.js';

export interface RouteDeps {
  store: Store;
  /** The current time as ISO-8601 (injectable so tests control it). */
  now: () => string;
  /** Savings documents kept per data version (services/savings-cache.ts), one per instance. */
  savingsCache: SavingsCache;
  /** Signs audit checkpoints; absent when no checkpoint key is configured. */
  checkpointSigner?: CheckpointSigner | undefined;
}
