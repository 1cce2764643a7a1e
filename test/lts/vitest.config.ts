/**
 * The tests that run a second time on the current Node.js LTS (see
 * run-on-lts.mjs): the pure engine, the pure reports and the command line's
 * fit and savings. The service's tests stay on the development Node only:
 * better-sqlite3's native addon is compiled for the Node that installed it,
 * so it cannot load in a second Node of another ABI.
 */
import { fileURLToPath } from 'node:url';
import { defineConfig } from 'vitest/config';

export default defineConfig({
  root: fileURLToPath(new URL('../..', import.meta.url)),
  test: {
    name: 'lts',
    testTimeout: 60_000,
    include: [
      'test/engine/**/*.test.ts',
      'test/reports/**/*.test.ts',
      'test/cli/fit.test.ts',
      'test/cli/savings.test.ts',
      'test/cli/usage.test.ts',
      'test/cli/bad-input.test.ts',
      'test/cli/csv-input.test.ts',
    ],
    exclude: [
      // The browser test drives Chromium: which Node runs it does not change what it checks.
      'test/reports/html/browser.test.ts',
      // The two longest seeded searches (about a minute of CPU together): the same numeric code is covered by the rest.
      'test/engine/scenarios.test.ts',
      'test/engine/fit/day-resolved/search.test.ts',
    ],
  },
});
