/**
 * Starts the service: configuration, database (migrated), optional bootstrap
 * key, HTTP. Stops cleanly on SIGINT/SIGTERM, finishing requests in flight.
 * A database fault while running (a restart, a failover, a terminated
 * connection) never ends the process: requests get 503 until it is back.
 */
import { pathToFileURL } from 'node:url';
import type { FastifyBaseLogger, FastifyInstance } from 'fastify';
import { loadConfig, type Config } from './config.js';
import { openStore, type Store } from './store/connect.js';
import { keepRunningThroughDatabaseFaults } from './process-guard.js';
import { migrateToLatest } from './store/migrate.js';
import { storeMissingFrozenModels } from './services/frozen-models.js';
import { releaseKeysOfGoneHolders } from './store/idempotency-keys.js';
import { holderIsGone } from './lib/process-holder.js';
import { bootstrapIfEmpty } from './services/organisations.js';
import { buildApp, LOG_REDACTIONS } from './http/app.js';
import { signEveryAuditHead } from './services/audit-checkpoints.js';

export interface RunningService {
  app: FastifyInstance;
  store: Store;
  url: string;
  stop(): Promise<void>;
}

export async function startService(config: Config): Promise<RunningService> {
  // The store is opened before the app (and its logger) exists: its events wait for the logger.
  let log: FastifyBaseLogger | null = null;
  const store = openStore(config.databaseUrl, {
    onEvent: (event) => {
      if (log)
        log.warn(
          { database: event },
          event.event === 'connection-error'
            ? 'database connection lost (the pool replaces it)'
            : 'database connection lost: retried on a fresh connection',
        );
      else process.stderr.write(`mvledger: database ${event.event}: ${event.message}\n`);
    },
  });
  await migrateToLatest(store.db);
  // Frozen baselines from before compact stored models (or imported) get theirs once, before the first report.
  const derivedModels = await storeMissingFrozenModels(store.db);
  const bootstrapped = await bootstrapIfEmpty(
    store.db,
    config.bootstrapKey,
    new Date().toISOString(),
    config.bootstrapOrganisation,
  );
  const app = await buildApp({
    store,
    logger: { level: config.logLevel, redact: LOG_REDACTIONS },
    bodyLimit: config.maxBodyBytes,
    rateLimitPerMinute: config.rateLimitPerMinute,
    failedAuthenticationsPerMinute: config.failedAuthPerMinute,
    requestTimeoutMs: config.requestTimeoutMs,
    headersTimeoutMs: config.headersTimeoutMs,
    savingsCacheBytes: config.savingsCacheBytes,
    checkpointSigner: config.checkpointSigner,
  });
  log = app.log;
  // Keys a process of this host left in flight when it died: a retry is served at once, not after a minute.
  const released = await releaseKeysOfGoneHolders(store.db, holderIsGone);
  if (released > 0) app.log.info({ released }, 'released idempotency keys left in flight by a process that died');
  if (derivedModels > 0)
    app.log.info({ derivedModels }, 'derived the compact models of frozen baselines that had none');
  if (bootstrapped) app.log.info('new database: created the bootstrap organisation and its admin key');
  const address = await app.listen({ port: config.port, host: config.host });
  app.log.info({ database: store.location }, 'mvledger is listening');
  const stopSigning = startCheckpointRounds(config, store, app.log);
  let stopping: Promise<void> | null = null;
  const stop = () =>
    (stopping ??= (async () => {
      stopSigning();
      await app.close();
      await store.close();
    })());
  return { app, store, url: address, stop };
}

/**
 * The periodic checkpoint signer: every CHECKPOINT_INTERVAL_SECONDS, each
 * organisation whose audit head moved gets a signed checkpoint. A failed
 * round (the database away) is logged and the next one tries again.
 * Returns the function that stops it.
 */
function startCheckpointRounds(config: Config, store: Store, log: FastifyBaseLogger): () => void {
  const signer = config.checkpointSigner;
  if (!signer) return () => {};
  log.info({ keyId: signer.keyId }, 'signing audit checkpoints');
  if (config.checkpointIntervalSeconds === 0) return () => {};
  let running = false;
  const timer = setInterval(() => {
    if (running) return;
    running = true;
    signEveryAuditHead(store.db, signer, new Date().toISOString())
      .then((signed) => {
        if (signed > 0) log.info({ signed, keyId: signer.keyId }, 'audit checkpoints signed');
      })
      .catch((error: unknown) =>
        log.warn({ err: error instanceof Error ? error.message : String(error) }, 'audit checkpoint round failed'),
      )
      .finally(() => {
        running = false;
      });
  }, config.checkpointIntervalSeconds * 1000);
  timer.unref();
  return () => clearInterval(timer);
}

async function main(): Promise<void> {
  let config: Config;
  try {
    config = loadConfig();
  } catch (error) {
    process.stderr.write(`mvledger: ${error instanceof Error ? error.message : String(error)}\n`);
    process.exitCode = 2;
    return;
  }
  const service = await startService(config);
  keepRunningThroughDatabaseFaults(service.app.log);
  for (const signal of ['SIGINT', 'SIGTERM'] as const) {
    process.once(signal, () => {
      service.app.log.info({ signal }, 'stopping');
      void service.stop().then(() => process.exit(0));
    });
  }
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  main().catch((error: unknown) => {
    process.stderr.write(`mvledger: could not start: ${error instanceof Error ? error.message : String(error)}\n`);
    process.exit(1);
  });
}
