#!/usr/bin/env node
// Thin launcher: the command line bundled by `npm run build` (src/cli/bundle.mjs; `npm ci` runs it via "prepare").
import { main } from '../dist/cli/main.js';

// A reader that stops early (`mvledger fit --batch … | head`) closes the pipe: stop quietly, as other tools do,
// instead of dying on an unhandled write error.
for (const stream of [process.stdout, process.stderr]) {
  stream.on('error', (error) => {
    if (error.code === 'EPIPE') process.exit(process.exitCode ?? 0);
    throw error;
  });
}

process.exitCode = await main(process.argv.slice(2), {
  stdout: (text) => process.stdout.write(text),
  stderr: (text) => process.stderr.write(text),
});
