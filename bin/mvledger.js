#!/usr/bin/env node
// Thin launcher: the compiled CLI lives in dist/src/ (built by `npm run build`, which `npm ci` runs via "prepare").
import { main } from '../dist/src/cli/main.js';

process.exitCode = await main(process.argv.slice(2), {
  stdout: (text) => process.stdout.write(text),
  stderr: (text) => process.stderr.write(text),
});
