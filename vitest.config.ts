/**
 * Two projects: "sqlite" runs every test; "postgres" runs the service tests
 * again on PostgreSQL, each test service in its own fresh schema, whenever a
 * server answers at MVLEDGER_TEST_POSTGRES_URL (default
 * postgres://postgres@127.0.0.1:5432/test). Set MVLEDGER_TEST_POSTGRES=off
 * to skip it, or =required to fail when no server answers.
 */
import { randomBytes } from 'node:crypto';
import { defineConfig } from 'vitest/config';
import { postgresReachable, testPostgresUrl } from './test/support/database.js';

const SERVICE_TESTS = [
  'test/http/**/*.test.ts',
  'test/services/**/*.test.ts',
  'test/store/**/*.test.ts',
  'test/multi-instance/**/*.test.ts',
  'test/faults/**/*.test.ts',
  'test/fuzz/**/*.test.ts',
];

/**
 * Test files run one after another in each worker without a fresh module
 * graph (isolate: false): importing the service again for every file cost
 * more than the tests. Files that replace a module with vi.mock need their
 * own graph, so they run in a project of their own.
 */
const MODULE_MOCKING_TESTS = [
  'test/cli/backup.test.ts',
  'test/cli/transfer.test.ts',
  'test/cli/keys.test.ts',
  'test/cli/internal-error.test.ts',
];

export default defineConfig(async () => {
  const wanted = process.env.MVLEDGER_TEST_POSTGRES ?? 'auto';
  const reachable = wanted !== 'off' && (await postgresReachable());
  if (wanted === 'required' && !reachable)
    throw new Error(`MVLEDGER_TEST_POSTGRES=required but no PostgreSQL answers at ${testPostgresUrl()}`);
  // Every schema of this run starts mvl_test_<run>_ (test/support/database.ts); workers inherit the id.
  process.env.MVLEDGER_TEST_RUN ??= randomBytes(3).toString('hex');
  if (!reachable && wanted !== 'off')
    console.warn(`PostgreSQL not reachable at ${testPostgresUrl()}: running the SQLite project only`);
  return {
    test: {
      testTimeout: 60_000,
      hookTimeout: 60_000,
      projects: [
        {
          extends: true,
          test: {
            name: 'sqlite',
            include: ['test/**/*.test.ts'],
            exclude: ['test/multi-instance/**', ...MODULE_MOCKING_TESTS],
            isolate: false,
          },
        },
        { extends: true, test: { name: 'sqlite-mocks', include: MODULE_MOCKING_TESTS } },
        ...(reachable
          ? [
              {
                extends: true,
                test: {
                  name: 'postgres',
                  include: SERVICE_TESTS,
                  isolate: false,
                  env: { MVLEDGER_TEST_DIALECT: 'postgres' },
                  globalSetup: ['test/support/postgres-run.ts'],
                },
              },
            ]
          : []),
      ],
    },
  };
});
