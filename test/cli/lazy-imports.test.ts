/**
 * `mvledger fit` and `savings` load only what they use: the modules they
 * import at run time (following every non-type import from the command's
 * module through src/) reach no database driver, no store, service or HTTP
 * code. Checked on the source, so it holds whatever machine runs it; the
 * start-up time it buys is measured by test/bench/cli.ts.
 */
import { readFileSync } from 'node:fs';
import { dirname, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
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
    it(`${command}: engine, CSV reader and formatting only`, () => {
      const { files, packages } = reachable(resolve(SRC, 'cli/commands', `${command}.ts`));
      expect(files.size).toBeGreaterThan(5);
      expect([...packages].filter((p) => FORBIDDEN_PACKAGES.includes(p))).toEqual([]);
      const outside = [...files].map((f) => f.slice(SRC.length + 1)).filter((f) => FORBIDDEN_FOLDERS.includes(f.split('/')[0]!));
      expect(outside).toEqual([]);
      expect(packages.has('csv-parse')).toBe(true);
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
