/**
 * Builds the /app workbench's script: web/src compiled and bundled by esbuild
 * into one ES module, dist/web/workbench.js, with the report chart modules it
 * imports from src/reports/svg. One file is one request and one compile in
 * the browser (the page measured 19 module requests before it could draw);
 * type checking stays with tsc (`npm run typecheck`, tsconfig.web.json).
 * Run by `npm run build` and `npm run build:web`.
 */
import { rmSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { build } from 'esbuild';

const root = fileURLToPath(new URL('../', import.meta.url));
const outdir = `${root}dist/web`;

// Only this build's output is served: nothing left over from an earlier one.
rmSync(outdir, { recursive: true, force: true });
await build({
  absWorkingDir: root,
  entryPoints: ['web/src/main.ts'],
  bundle: true,
  format: 'esm',
  target: 'es2022',
  platform: 'browser',
  minify: true,
  legalComments: 'none',
  outfile: `${outdir}/workbench.js`,
  logLevel: 'warning',
});
