/**
 * `mvledger fit` and `savings` load only what they use: the modules they
 * import at run time (following every non-type import from the command's
 * module through src/) reach no database driver, no store, service or HTTP
 * code. Checked on the source (the import graph), and at run time: a fresh
 * process runs the command with every module it loads recorded
 * (test/support/record-loads.mjs). The start-up time it buys is measured by
 * test/bench/cli.ts.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { describe, expect, it } from 'vitest';

const SRC = resolve(dirname(fileURLToPath(import.meta.url)), '../../src');

/** Specifiers of the module's static imports that survive compilation (type-only imports are erased). */
function runtimeImports(file: string): string[] {
  const text = readFileSync(file, 'utf8');
  const found: string[] = [];
  const pattern = /^(?:import|export)\s+(type\s+)?(?:[^'";]*?\sfrom\s+)?['"]([^'"]+)['"]/gms;
  for (const match of text.matchAll(pattern)) {
    if (match[1]) continue;
    // `import { type A, type B } from …` is erased too.
    const names = /^(?:import|export)\s+\{([^}]*)\}/.exec(match[0])?.[1];
    const all = (names ?? '')
      .split(',')
      .map((n) => n.trim())
      .filter((n) => n !== '');
    if (all.length > 0 && all.every((n) => n.startsWith('type '))) continue;
    found.push(match[2]!);
  }
  return found;
}

/** Every module reached from `entry`: files under src/ and the packages named. */
function reachable(entry: string): { files: Set<string>; packages: Set<string> } {
  const files = new Set<string>();
  const packages = new Set<string>();
  const queue = [entry];
  while (queue.length > 0) {
    const file = queue.pop()!;
    if (files.has(file)) continue;
    files.add(file);
    for (const specifier of runtimeImports(file)) {
      if (specifier.startsWith('.')) queue.push(resolve(dirname(file), specifier.replace(/\.js$/, '.ts')));
      else packages.add(specifier.startsWith('node:') ? specifier : specifier.split('/')[0]!);
    }
  }
  return { files, packages };
}

const FORBIDDEN_PACKAGES = ['kysely', 'pg', 'better-sqlite3', 'fastify', 'pino', 'zod'];
const FORBIDDEN_FOLDERS = ['store', 'services', 'http', 'demo'];

describe('the fit and savings commands import no database or service code', () => {
  for (const command of ['fit', 'savings', 'fit-batch']) {
    it(`${command}: engine, CSV table reader and formatting only`, () => {
      const { files, packages } = reachable(resolve(SRC, 'cli/commands', `${command}.ts`));
      expect(files.size).toBeGreaterThan(5);
      expect([...packages].filter((p) => FORBIDDEN_PACKAGES.includes(p))).toEqual([]);
      const outside = [...files]
        .map((f) => f.slice(SRC.length + 1))
        .filter((f) => FORBIDDEN_FOLDERS.includes(f.split('/')[0]!));
      expect(outside).toEqual([]);
      // csv-parse is required lazily, only for a file that is not plain (src/lib/csv/csv-table.ts).
      expect(packages.has('csv-parse')).toBe(false);
    });
  }

  it('main.ts imports every command lazily (no static import of a command module)', () => {
    const statics = runtimeImports(resolve(SRC, 'cli/main.ts'));
    expect(statics.filter((s) => s.includes('commands/') || s.includes('shared') || s.includes('usage'))).toEqual([]);
  });

  it('the graph walk sees a database driver where there is one (the check can fail)', () => {
    const { packages } = reachable(resolve(SRC, 'cli/commands', 'keys.ts'));
    expect(packages.has('kysely')).toBe(true);
  });
});

/** Run the command in a fresh node process (the sources through tsx) and list every module it loaded. */
function modulesLoadedBy(argv: string[], exitCode: number): string[] {
  const folder = mkdtempSync(join(tmpdir(), 'mvledger-loads-'));
  const record = join(folder, 'loads.txt');
  try {
    const script = `import { main } from ${JSON.stringify(pathToFileURL(resolve(SRC, 'cli/main.ts')).href)};
process.exitCode = await main(${JSON.stringify(argv)}, { stdout: () => {}, stderr: () => {} });`;
    const run = spawnSync(
      process.execPath,
      [
        '--import',
        'tsx',
        '--import',
        resolve(SRC, '../test/support/record-loads.mjs'),
        '--input-type=module',
        '-e',
        script,
      ],
      {
        cwd: resolve(SRC, '..'),
        env: { ...process.env, MVLEDGER_RECORD_LOADS: record, DATABASE_URL: 'sqlite::memory:' },
        encoding: 'utf8',
      },
    );
    expect(run.error).toBeUndefined();
    expect(run.status, run.stderr).toBe(exitCode);
    return readFileSync(record, 'utf8')
      .split('\n')
      .filter((line) => line !== '');
  } finally {
    rmSync(folder, { recursive: true, force: true });
  }
}

/** The loaded modules that are database drivers, the query builder, HTTP, zod, or our store, services and HTTP code. */
function heavy(urls: readonly string[]): string[] {
  return urls.filter(
    (url) =>
      /\/node_modules\/(kysely|pg|pg-pool|better-sqlite3|fastify|pino|zod)\//.test(url) ||
      /\/src\/(store|services|http|demo)\//.test(url),
  );
}

describe('what a command loads when it runs (a fresh process, every module recorded)', () => {
  const examples = resolve(SRC, '../examples');

  it('fit on the example files loads no database driver, query builder, service or HTTP module', () => {
    const loaded = modulesLoadedBy(
      ['fit', '--readings', join(examples, 'baseline.csv'), '--weather', join(examples, 'weather.csv')],
      0,
    );
    expect(loaded.some((url) => url.includes('/src/engine/'))).toBe(true);
    expect(heavy(loaded)).toEqual([]);
  });

  it('the record sees them where they are loaded (keys list opens the database: the check can fail)', () => {
    const loaded = modulesLoadedBy(['keys', 'list'], 0);
    expect(heavy(loaded).some((url) => url.includes('/node_modules/kysely/'))).toBe(true);
  });
});
