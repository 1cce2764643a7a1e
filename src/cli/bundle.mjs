/**
 * Bundles the command line for `bin/mvledger.js`: src/cli/main.ts and what
 * it imports, compiled by esbuild into a few ES modules under dist/cli.
 * Each command stays its own chunk, loaded when the command runs (main.ts
 * imports them lazily), so `fit` still loads neither database driver nor
 * service; packages stay external (node_modules, native better-sqlite3).
 * One chunk per command instead of ~150 small files saves the command a
 * few dozen milliseconds of opening and compiling modules at every start.
 * The batch fit's worker thread is an entry of its own beside the chunks
 * (fit-batch-threads.ts starts ./fit-batch-thread.js next to itself).
 * Run by `npm run build`; type checking stays with tsc.
 */
import { rmSync } from 'node:fs';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { build } from 'esbuild';

const root = fileURLToPath(new URL('../../', import.meta.url));

/**
 * Build the bundle into `outdir` (default dist/cli), replacing what was there.
 * Answers the folder and esbuild's metafile (which source files each output
 * holds: the tests read it to check what a command's chunks contain).
 */
export async function buildCliBundle(outdir = `${root}dist/cli`) {
  rmSync(outdir, { recursive: true, force: true });
  const result = await build({
    absWorkingDir: root,
    entryPoints: {
      main: 'src/cli/main.ts',
      'fit-batch-thread': 'src/cli/commands/fit-batch-thread.ts',
    },
    bundle: true,
    splitting: true,
    format: 'esm',
    platform: 'node',
    target: 'node20',
    packages: 'external',
    outdir,
    entryNames: '[name]',
    chunkNames: '[name]-[hash]',
    // Source maps beside the chunks: `node --enable-source-maps` then names the TypeScript lines.
    sourcemap: true,
    legalComments: 'none',
    metafile: true,
    logLevel: 'warning',
  });
  return { outdir, metafile: result.metafile };
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) await buildCliBundle();
