/**
 * The last line of defence of the service (src/process-guard.ts, installed by src/server.ts): a database fault that escapes
 * every handler (an 'error' event nobody listens to, a rejected promise
 * nobody awaits) is logged and the process goes on; any other uncaught
 * error still ends it, as Node would (exit code 1). Each case runs in a
 * child process of its own. Check values: Node's documented behaviour for
 * uncaught errors (exit code 1) and the fault classes of src/store/faults.ts.
 */
import { execFile } from 'node:child_process';
import { join } from 'node:path';
import { promisify } from 'node:util';
import { describe, expect, it } from 'vitest';
import { testDialect } from '../support/database.js';

const ROOT = join(import.meta.dirname, '..', '..');
const run = promisify(execFile);

/** Run `body` after installing the handlers with a logger that prints to stdout; its exit code and output. */
async function child(body: string): Promise<{ code: number; stdout: string }> {
  const script = `
    import { EventEmitter } from 'node:events';
    import { keepRunningThroughDatabaseFaults } from ${JSON.stringify(join(ROOT, 'src', 'process-guard.ts'))};
    const log = { warn: (o, m) => console.log('warn', m), fatal: (o, m) => console.log('fatal', m, JSON.stringify(o)) };
    keepRunningThroughDatabaseFaults(log);
    const fault = Object.assign(new Error('terminating connection due to administrator command'), { code: '57P01' });
    ${body}
    setTimeout(() => { console.log('still running'); process.exit(0); }, 200);
  `;
  try {
    const { stdout } = await run(process.execPath, ['--import', 'tsx', '--input-type=module', '-e', script], {
      cwd: ROOT,
      timeout: 30_000,
    });
    return { code: 0, stdout };
  } catch (error) {
    const failed = error as { code?: number; stdout?: string };
    return { code: failed.code ?? -1, stdout: failed.stdout ?? '' };
  }
}

// No database is involved: run once, in the sqlite project.
describe.skipIf(testDialect() === 'postgres')('process-level handlers', () => {
  it('outlives a database fault emitted with no listener and one rejected with nobody awaiting', async () => {
    const result = await child(`setImmediate(() => new EventEmitter().emit('error', fault)); Promise.reject(fault);`);
    expect(result.code).toBe(0);
    expect(result.stdout).toContain('database fault outside a request: ignored');
    expect(result.stdout).toContain('database fault in a promise nobody awaited: ignored');
    expect(result.stdout).toContain('still running');
  });

  it('still ends on any other uncaught error, with exit code 1 and no stack in the log', async () => {
    const thrown = await child(`Promise.reject(new TypeError('a bug'));`);
    expect(thrown.code).toBe(1);
    expect(thrown.stdout).toMatch(
      /fatal uncaught exception: stopping \{"err":\{"type":"TypeError","message":"a bug"\}\}/,
    );
    expect(thrown.stdout).not.toContain('still running');
    const odd = await child(`Promise.reject(undefined);`);
    expect(odd.code).toBe(1);
    expect(odd.stdout).toContain('"type":"undefined"');
  });
});
