/**
 * The command line as it ships: src/cli bundled by src/cli/build.mjs (what
 * `npm run build` writes to dist/cli and bin/mvledger.js runs). Built here
 * into a folder of its own, then run in fresh processes: the bundle gives
 * the same output as the sources, and `fit` still loads no database driver,
 * query builder, store, service or HTTP code (the chunks it loads are mapped
 * back to their source files through esbuild's metafile).
 */
import { spawnSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, readFileSync, realpathSync, rmSync } from 'node:fs';
import { join, relative, resolve } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runCli } from './helpers.js';

const ROOT = resolve(fileURLToPath(new URL('../../', import.meta.url)));
const EXAMPLES = join(ROOT, 'examples');
const FIT_ARGS = ['fit', '--readings', join(EXAMPLES, 'baseline.csv'), '--weather', join(EXAMPLES, 'weather.csv')];

interface Metafile {
  outputs: Record<string, { inputs: Record<string, unknown>; imports: { path: string; external?: boolean }[] }>;
}

let outdir = '';
let runs = 0;
let metafile: Metafile;

beforeAll(async () => {
  // Under node_modules so the bundle's packages resolve as they do from dist/cli.
  const cache = join(ROOT, 'node_modules', '.cache');
  mkdirSync(cache, { recursive: true });
  outdir = mkdtempSync(join(cache, 'mvledger-cli-bundle-'));
  const { buildCli } = (await import(pathToFileURL(join(ROOT, 'src/cli/build.mjs')).href)) as {
    buildCli: (outdir: string) => Promise<{ metafile: Metafile }>;
  };
  metafile = (await buildCli(outdir)).metafile;
}, 60_000);

afterAll(() => {
  if (outdir) rmSync(outdir, { recursive: true, force: true });
});

/** Run the bundle's main() in a fresh process, recording every module URL it loads. */
function runBundle(argv: string[]): { status: number | null; stdout: string; loaded: string[] } {
  const record = join(outdir, `loads-${++runs}.txt`);
  const script = `import { main } from ${JSON.stringify(pathToFileURL(join(outdir, 'main.js')).href)};
process.exitCode = await main(${JSON.stringify(argv)}, { stdout: (t) => process.stdout.write(t), stderr: (t) => process.stderr.write(t) });`;
  const run = spawnSync(
    process.execPath,
    ['--import', join(ROOT, 'test/support/record-loads.mjs'), '--input-type=module', '-e', script],
    {
      cwd: ROOT,
      env: { ...process.env, MVLEDGER_RECORD_LOADS: record, DATABASE_URL: 'sqlite::memory:' },
      encoding: 'utf8',
    },
  );
  expect(run.error).toBeUndefined();
  const loaded = readFileSync(record, 'utf8')
    .split('\n')
    .filter((line) => line !== '');
  return { status: run.status, stdout: run.stdout, loaded };
}

/** The source files and external packages inside the bundle's outputs that the process loaded. */
function sourcesLoaded(urls: readonly string[]): { sources: string[]; packages: string[] } {
  // The loader reports real paths (node_modules may be a link); the metafile names outputs from the root.
  const bundleDir = realpathSync(outdir);
  const sources = new Set<string>();
  const packages = new Set<string>();
  for (const url of urls) {
    if (!url.startsWith('file:')) continue;
    const file = fileURLToPath(url);
    if (!file.startsWith(`${bundleDir}/`)) {
      if (file.includes('/node_modules/')) packages.add(file.split('/node_modules/').at(-1)!.split('/')[0]!);
      continue;
    }
    const output = metafile.outputs[relative(ROOT, join(outdir, relative(bundleDir, file)))];
    expect(output, file).toBeDefined();
    if (!output) continue;
    for (const input of Object.keys(output.inputs)) sources.add(input);
    for (const imported of output.imports) if (imported.external) packages.add(imported.path.split('/')[0]!);
  }
  return { sources: [...sources], packages: [...packages] };
}

const HEAVY_PACKAGES = ['kysely', 'pg', 'pg-pool', 'better-sqlite3', 'fastify', 'pino', 'zod'];
const heavySources = (sources: readonly string[]) =>
  sources.filter((s) => /^src\/(store|services|http|demo)\//.test(s));

describe('the bundled command line (src/cli/build.mjs)', () => {
  it('fit prints what the sources print', async () => {
    const bundled = runBundle(FIT_ARGS);
    expect(bundled.status).toBe(0);
    const fromSource = await runCli(FIT_ARGS);
    expect(fromSource.code).toBe(0);
    expect(bundled.stdout).toBe(fromSource.stdout);
  });

  it('fit loads a few chunks and no database driver, query builder, store, service or HTTP code', () => {
    const { loaded } = runBundle(FIT_ARGS);
    const chunks = loaded.filter((url) => url.startsWith(pathToFileURL(realpathSync(outdir)).href));
    // main, the options, the command and the chunks it shares with others: about ten files, where the
    // unbundled build loaded one file per module (79 on these files: a recorded run before bundling).
    expect(chunks.length).toBeLessThan(16);
    const { sources, packages } = sourcesLoaded(loaded);
    expect(sources.some((s) => s.startsWith('src/engine/'))).toBe(true);
    expect(heavySources(sources)).toEqual([]);
    expect(packages.filter((p) => HEAVY_PACKAGES.includes(p))).toEqual([]);
  });

  it('the record sees them where they are loaded (keys list opens the database: the check can fail)', () => {
    const { status, loaded } = runBundle(['keys', 'list']);
    expect(status).toBe(0);
    const { sources, packages } = sourcesLoaded(loaded);
    expect(heavySources(sources).some((s) => s.startsWith('src/store/'))).toBe(true);
    expect(packages).toContain('kysely');
  });
});
