/**
 * Where the benchmarks write and what they start. `npm run bench` compiles
 * the benchmarks and the service with tsc (tsconfig.bench.json → dist-bench/,
 * and `npm run build` → dist/) and runs plain node: the code as it ships.
 * (tsx, which runs the TypeScript directly, keeps every function's name with
 * a wrapper call that makes the numeric code measurably slower.) Run directly
 * with tsx, a benchmark still works and says so.
 */
import { existsSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

/** The repository root: the nearest directory above this file with a package.json. */
function findRoot(): string {
  let dir = dirname(fileURLToPath(import.meta.url));
  while (!existsSync(join(dir, 'package.json')) && dirname(dir) !== dir) dir = dirname(dir);
  return dir;
}

/** True when this file runs compiled (dist-bench/), false under tsx. */
export const COMPILED = import.meta.url.endsWith('.js');

/** dist-bench/ holds no package.json, so the search climbs past it to the repository either way. */
export const REPO_ROOT = findRoot();

/** test/bench/results/ in the repository, wherever the benchmark runs from. */
export const RESULTS_DIR = join(REPO_ROOT, 'test', 'bench', 'results');

/** How the benchmark runs: for the printed header and the results file. */
export const RUNTIME = COMPILED
  ? 'compiled with tsc, plain node (as shipped)'
  : 'tsx (TypeScript run directly; slower than the shipped build)';

/** The node arguments that start the service: the built server when compiled, the TypeScript source under tsx otherwise. */
export function serverArguments(): string[] {
  return COMPILED
    ? [join(REPO_ROOT, 'dist', 'src', 'server.js')]
    : ['--import', 'tsx', join(REPO_ROOT, 'src', 'server.ts')];
}
