/**
 * Headless Chromium for the browser tests, through playwright-core and a
 * system Chromium (never a downloaded one). The policy comes from
 * MVLEDGER_TEST_BROWSER:
 *   off       never run the browser tests;
 *   auto      (default) run them when the executable exists, else skip with a warning;
 *   required  run them, and fail when the executable is missing.
 * The executable is MVLEDGER_CHROMIUM, default /usr/bin/chromium.
 */
import { accessSync, constants } from 'node:fs';
import { chromium, type Browser } from 'playwright-core';

export type BrowserPolicy = 'off' | 'auto' | 'required';

export const DEFAULT_CHROMIUM = '/usr/bin/chromium';

/** The policy from the environment; an unknown value is a mistake worth stopping for. */
export function browserPolicy(): BrowserPolicy {
  const value = process.env.MVLEDGER_TEST_BROWSER ?? 'auto';
  if (value === 'off' || value === 'auto' || value === 'required') return value;
  throw new Error(`MVLEDGER_TEST_BROWSER must be off, auto or required, not ${JSON.stringify(value)}`);
}

export function chromiumPath(): string {
  return process.env.MVLEDGER_CHROMIUM ?? DEFAULT_CHROMIUM;
}

function executable(path: string): boolean {
  try {
    accessSync(path, constants.X_OK);
    return true;
  } catch {
    return false;
  }
}

/**
 * Whether the browser tests should run. Under "required" a missing
 * executable throws (the test file then fails); under "auto" it warns and
 * answers false.
 */
export function browserAvailable(): boolean {
  const policy = browserPolicy();
  if (policy === 'off') return false;
  const path = chromiumPath();
  if (executable(path)) return true;
  const message = `no Chromium executable at ${path} (set MVLEDGER_CHROMIUM)`;
  if (policy === 'required') throw new Error(`MVLEDGER_TEST_BROWSER=required but ${message}`);
  console.warn(`${message}: skipping the browser tests`);
  return false;
}

/** Start headless Chromium; the caller closes it. */
export function launchBrowser(): Promise<Browser> {
  // --no-sandbox: test containers often run as root, where Chromium's sandbox refuses to start.
  return chromium.launch({ executablePath: chromiumPath(), headless: true, args: ['--no-sandbox'] });
}
