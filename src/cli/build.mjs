/**
 * Builds the command line the `mvledger` launcher runs: src/cli bundled by
 * esbuild into dist/cli/, main.js plus one chunk per command (and the shared
 * code the commands have in common), so each command still loads only what
 * it uses: `fit` and `savings` never reach the database drivers or the
 * service. A fresh `fit` used to read and compile about 150 small modules
 * from dist/src before it could start; now it reads a handful.
 * Packages stay outside the bundle (resolved from node_modules at run time,
 * as before). fit-batch-thread.js is an entry of its own: the batch's
 * worker threads start it by name beside the chunk that starts them.
 * Type checking stays with tsc. Run by `npm run build` and `npm run build:cli`.
 */
import { rmSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { build } from 'esbuild';

const root = fileURLToPath(new URL('../../', import.meta.url));

/**
 * Bundle into `outdir` (emptied first: chunk names carry a content hash, so
 * nothing is left over from an earlier build). The answer's metafile says
 * which source files each output holds (the tests read it to check what a
 * command loads).
 */
export async function buildCli(outdir = `${root}dist/cli`) {
  rmSync(outdir, { recursive: true, force: true });
  return build({
    absWorkingDir: root,
    entryPoints: ['src/cli/main.ts', 'src/cli/commands/fit-batch-thread.ts'],
    bundle: true,
    splitting: true,
    format: 'esm',
    platform: 'node',
    target: 'node20',
    packages: 'external',
    outdir,
    entryNames: '[name]',
    chunkNames: '[name]-[hash]',
    sourcemap: true,
    legalComments: 'none',
    metafile: true,
    logLevel: 'warning',
  });
}

if (process.argv[1] === fileURLToPath(import.meta.url)) await buildCli();
