#!/usr/bin/env node
// Thin launcher: the CLI is bundled into dist/cli/ (src/cli/build.mjs, run by `npm run build`, which `npm ci` runs via "prepare").
import { main } from '../dist/cli/main.js';

process.exitCode = await main(process.argv.slice(2), {
  stdout: (text) => process.stdout.write(text),
  stderr: (text) => process.stderr.write(text),
});
