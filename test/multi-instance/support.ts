/**
 * Real service processes for the multi-instance tests: each is
 * `node --import tsx src/server.ts` on its own loopback port, started like a
 * deployment would start it, with its output kept so a failing test can show
 * it. Children are killed when the test file ends, and also if the test
 * worker itself exits first.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { join } from 'node:path';
import { freePort } from '../support/ports.js';

const ROOT = join(import.meta.dirname, '..', '..');
const READY_TIMEOUT_MS = 30_000;
const STOP_TIMEOUT_MS = 5_000;
/** Enough of a child's output to see why it failed, without unbounded memory. */
const MAX_OUTPUT_CHARS = 200_000;

export interface Instance {
  name: string;
  base: string;
  child: ChildProcess;
  /** Everything the child wrote to stdout and stderr so far (the tail, when long). */
  output(): string;
  /** Requests whose URL contains `urlPart` that the service has logged as received (logLevel info only). */
  requestsReceived(urlPart: string): number;
}

const running = new Set<ChildProcess>();
// A worker that dies mid-test must not leave servers behind holding the schema.
process.once('exit', () => {
  for (const child of running) child.kill('SIGKILL');
});

const sleep = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms));

/** Start one service process and wait until /readyz answers 200 (or fail with its output). */
export async function startInstance(options: {
  name: string;
  databaseUrl: string;
  bootstrapKey?: string;
  /** The service's LOG_LEVEL (default warn); info logs every incoming request, which requestsReceived counts. */
  logLevel?: string;
}): Promise<Instance> {
  const port = await freePort();
  const env: NodeJS.ProcessEnv = {
    ...process.env,
    PORT: String(port),
    HOST: '127.0.0.1',
    DATABASE_URL: options.databaseUrl,
    LOG_LEVEL: options.logLevel ?? 'warn',
  };
  delete env.MVLEDGER_BOOTSTRAP_KEY;
  if (options.bootstrapKey) env.MVLEDGER_BOOTSTRAP_KEY = options.bootstrapKey;
  const child = spawn(process.execPath, ['--import', 'tsx', join(ROOT, 'src', 'server.ts')], {
    cwd: ROOT,
    env,
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  running.add(child);
  let output = '';
  let partialLine = '';
  const received: string[] = [];
  const keep = (chunk: Buffer) => {
    output = (output + chunk.toString()).slice(-MAX_OUTPUT_CHARS);
    const lines = (partialLine + chunk.toString()).split('\n');
    partialLine = lines.pop() ?? '';
    for (const line of lines) if (line.includes('"incoming request"')) received.push(line);
  };
  child.stdout?.on('data', keep);
  child.stderr?.on('data', keep);
  let exited: string | null = null;
  child.once('exit', (code, signal) => {
    exited = `exited with ${signal ?? `code ${code}`}`;
    running.delete(child);
  });

  const instance: Instance = {
    name: options.name,
    base: `http://127.0.0.1:${port}`,
    child,
    output: () => output,
    requestsReceived: (urlPart) => received.filter((line) => line.includes(urlPart)).length,
  };
  const deadline = Date.now() + READY_TIMEOUT_MS;
  while (Date.now() < deadline) {
    if (exited) break;
    try {
      const response = await fetch(`${instance.base}/readyz`, { signal: AbortSignal.timeout(1000) });
      if (response.ok) return instance;
    } catch {
      // not listening yet
    }
    await sleep(100);
  }
  await stopInstance(instance);
  throw new Error(
    `service ${options.name} did not become ready (${exited ?? `no answer within ${READY_TIMEOUT_MS} ms`}); its output:\n${output}`,
  );
}

/** SIGTERM (the service finishes requests in flight), then SIGKILL if it lingers. */
export async function stopInstance(instance: Instance): Promise<void> {
  const child = instance.child;
  if (child.exitCode !== null || child.signalCode !== null) return;
  const exited = new Promise<void>((resolve) => child.once('exit', () => resolve()));
  child.kill('SIGTERM');
  const timer = setTimeout(() => child.kill('SIGKILL'), STOP_TIMEOUT_MS);
  await exited;
  clearTimeout(timer);
}

/** Every instance's output, headed by its name, for a failure report. */
export function describeOutputs(instances: readonly Instance[]): string {
  return instances.map((i) => `----- ${i.name} (${i.base}) -----\n${i.output() || '(no output)'}`).join('\n');
}

export interface Answer {
  instance: string;
  method: string;
  path: string;
  status: number;
  headers: Headers;
  text: string;
  /** Parsed JSON body, or undefined. */
  json: any;
}

/** A JSON client of one instance that records every answer (so a test can check none was a 5xx). */
export function clientOf(instance: Instance, key: string, log: Answer[]) {
  return async (
    method: string,
    path: string,
    body?: unknown,
    headers: Record<string, string> = {},
  ): Promise<Answer> => {
    const response = await fetch(`${instance.base}${path}`, {
      method,
      headers: {
        authorization: `Bearer ${key}`,
        ...(body === undefined ? {} : { 'content-type': 'application/json' }),
        ...headers,
      },
      ...(body === undefined ? {} : { body: JSON.stringify(body) }),
      signal: AbortSignal.timeout(20_000),
    });
    const text = await response.text();
    let json: any;
    try {
      json = text ? JSON.parse(text) : undefined;
    } catch {
      json = undefined;
    }
    const answer: Answer = {
      instance: instance.name,
      method,
      path,
      status: response.status,
      headers: response.headers,
      text,
      json,
    };
    log.push(answer);
    return answer;
  };
}

export type Client = ReturnType<typeof clientOf>;
