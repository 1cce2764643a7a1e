/**
 * A service process for a benchmark: the built server on a free loopback
 * port, the given bootstrap key as its admin key, no rate limit, waiting
 * until /readyz answers (or failing after `attempts` tries 100 ms apart).
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { freePort } from '../support/ports.js';
import { serverArguments } from './paths.js';

export async function startBenchService(options: {
  databaseUrl: string;
  bootstrapKey: string;
  extraEnv?: Record<string, string>;
  attempts?: number;
}): Promise<{ child: ChildProcess; base: string }> {
  const port = await freePort();
  const child = spawn(process.execPath, serverArguments(), {
    env: {
      ...process.env,
      ...options.extraEnv,
      PORT: String(port),
      HOST: '127.0.0.1',
      DATABASE_URL: options.databaseUrl,
      LOG_LEVEL: 'warn',
      MVLEDGER_BOOTSTRAP_KEY: options.bootstrapKey,
      RATE_LIMIT_PER_MINUTE: '0',
    },
    stdio: ['ignore', 'inherit', 'inherit'],
  });
  const base = `http://127.0.0.1:${port}`;
  for (let attempt = 0; attempt < (options.attempts ?? 200); attempt++) {
    try {
      if ((await fetch(`${base}/readyz`)).ok) return { child, base };
    } catch {
      // not listening yet
    }
    await new Promise((r) => setTimeout(r, 100));
  }
  child.kill('SIGKILL');
  throw new Error('the service did not become ready');
}
