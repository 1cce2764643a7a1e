/**
 * The shipped launcher: `bin/mvledger.js` runs the command line bundled by
 * src/cli/bundle.mjs (rebuilt here from the sources, as `npm run build`
 * does). In a fresh process, with every module it loads recorded
 * (test/support/record-loads.mjs): `fit` answers as the in-process tests
 * expect and loads a handful of bundle files and no database driver, query
 * builder, HTTP or validation package; `fit --batch` on worker threads finds
 * its thread's entry beside the chunks. Check values: the example files'
 * own fit (examples/README.md) and the API contract of the commands.
 */
import { spawn, spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, relative, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
// @ts-expect-error: a plain ES module of the build, without types
import { buildCliBundle } from '../../src/cli/bundle.mjs';

const ROOT = resolve(dirname(fileURLToPath(import.meta.url)), '../..');
const BIN = join(ROOT, 'bin', 'mvledger.js');
const EXAMPLES = join(ROOT, 'examples');

let folder: string;
/** The example files' fit, run once in a fresh process for the tests that look at it. */
let exampleFit: ReturnType<typeof run>;

/** A batch readings file: the example's bills for each named (invented) meter. */
function writeBatch(name: string, meters: readonly string[]): string {
  const rows = readFileSync(join(EXAMPLES, 'baseline.csv'), 'utf8').trimEnd().split('\n');
  const file = join(folder, name);
  const lines = meters.flatMap((m) => rows.slice(1).map((row) => `${m},${row}`));
  writeFileSync(file, `meter,${rows[0]}\n${lines.join('\n')}\n`);
  return file;
}
/** Which source files each bundle output holds, by output path from the root (esbuild's metafile). */
let outputs: Record<string, { inputs: Record<string, unknown> }>;

function run(
  argv: string[],
  env: Record<string, string> = {},
): { status: number | null; stdout: string; loaded: string[] } {
  const record = join(folder, `loads-${Math.random().toString(36).slice(2)}.txt`);
  const result = spawnSync(process.execPath, ['--import', join(ROOT, 'test/support/record-loads.mjs'), BIN, ...argv], {
    cwd: ROOT,
    encoding: 'utf8',
    env: { ...process.env, ...env, MVLEDGER_RECORD_LOADS: record },
  });
  expect(result.error).toBeUndefined();
  const loaded = readFileSync(record, 'utf8')
    .split('\n')
    .filter((line) => line !== '');
  return { status: result.status, stdout: result.stdout, loaded };
}

describe('bin/mvledger.js runs the bundled command line', () => {
  beforeAll(async () => {
    folder = mkdtempSync(join(tmpdir(), 'mvledger-bundle-'));
    ({
      metafile: { outputs },
    } = await buildCliBundle());
    exampleFit = run(['fit', '--readings', join(EXAMPLES, 'baseline.csv'), '--weather', join(EXAMPLES, 'weather.csv')]);
  }, 60_000);
  afterAll(() => rmSync(folder, { recursive: true, force: true }));

  it('fit: the example fit, from a few bundle files and no database, HTTP or validation package', () => {
    const { status, stdout, loaded } = exampleFit;
    expect(status).toBe(0);
    expect(stdout).toMatch(/^Baseline fit\n/);
    const bundleFiles = loaded.filter((url) => url.includes('/dist/cli/'));
    expect(bundleFiles.length).toBeGreaterThan(1); // the launcher's entry and the fit's chunks
    expect(bundleFiles.length).toBeLessThanOrEqual(12); // one chunk per command and shared code, not a file per module
    expect(loaded.filter((url) => url.includes('/src/'))).toEqual([]);
    expect(
      loaded.filter((url) => /\/node_modules\/(kysely|pg|pg-pool|better-sqlite3|fastify|pino|zod)\//.test(url)),
    ).toEqual([]);
  });

  it("fit: the bundle files it loads hold no store, service, HTTP or demo source (esbuild's metafile)", () => {
    const { status, loaded } = exampleFit;
    expect(status).toBe(0);
    const sources = loaded
      .filter((url) => url.includes('/dist/cli/'))
      .flatMap((url) => {
        const output = outputs[relative(ROOT, fileURLToPath(url))];
        expect(output, url).toBeDefined();
        return Object.keys(output?.inputs ?? {});
      });
    expect(sources.some((s) => s.startsWith('src/engine/'))).toBe(true);
    expect(sources.filter((s) => /^src\/(store|services|http|demo)\//.test(s))).toEqual([]);
    // The check can fail: the keys command's chunks do hold the store (repository layout).
    const everything = Object.values(outputs).flatMap((o) => Object.keys(o.inputs));
    expect(everything.some((s) => s.startsWith('src/store/'))).toBe(true);
  });

  it('fit --batch on worker threads: every meter fitted, one CSV row each', () => {
    const batch = writeBatch('batch.csv', ['a', 'b', 'c']);
    const { status, stdout, loaded } = run(
      ['fit', '--batch', '--readings', batch, '--weather', join(EXAMPLES, 'weather.csv')],
      { MVLEDGER_FIT_THREADS: '2' },
    );
    expect(status).toBe(0);
    const lines = stdout.trimEnd().split('\n');
    expect(lines).toHaveLength(4); // a header and the three invented meters
    expect(lines.slice(1).every((line) => /^[abc],.*,ok,/.test(line))).toBe(true);
    expect(loaded.some((url) => url.endsWith('/dist/cli/fit-batch-thread.js'))).toBe(true);
  });

  it('stops quietly when its reader closes the pipe early (as `| head` does): exit 0, nothing on stderr', async () => {
    // Enough meters that output is still being written when the reader goes (synthetic: the example's bills, renamed).
    const many = writeBatch(
      'many.csv',
      Array.from({ length: 300 }, (_, m) => `meter-${m}`),
    );
    const child = spawn(process.execPath, [
      BIN,
      'fit',
      '--batch',
      '--readings',
      many,
      '--weather',
      join(EXAMPLES, 'weather.csv'),
    ]);
    let stderr = '';
    child.stderr.on('data', (chunk: Buffer) => (stderr += chunk.toString()));
    child.stdout.once('data', () => child.stdout.destroy()); // the reader has seen enough
    const code = await new Promise<number | null>((done) => child.on('close', done));
    expect(stderr).not.toMatch(/EPIPE|Error|at /);
    expect(code).toBe(0);
  });
});
