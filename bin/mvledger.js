#!/usr/bin/env node
// Thin launcher: the command line bundled by `npm run build` (src/cli/bundle.mjs; `npm ci` runs it via "prepare").
import { main } from '../dist/cli/main.js';

process.exitCode = await main(process.argv.slice(2), {
  stdout: (text) => process.stdout.write(text),
  stderr: (text) => process.stderr.write(text),
});
