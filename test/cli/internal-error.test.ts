/** An unexpected failure. Source of the check values: the CLI's own contract (src/cli/main.ts: exit 1, one line). */
import { afterAll, describe, expect, it, vi } from 'vitest';
import { makeTempFolder, readingsCsv, runCli, syntheticBills, syntheticWeather, weatherCsv } from './helpers.js';

// Synthetic: the engine is made to fail unexpectedly, with a multi-line message.
vi.mock('../../src/engine/index.js', async (importOriginal) => ({
  ...(await importOriginal<typeof import('../../src/engine/index.js')>()),
  analyseBaseline: () => {
    throw new Error('matrix went sideways\nsecond line');
  },
}));

const folder = makeTempFolder();
afterAll(() => folder.remove());

describe('an unexpected failure', () => {
  it('prints one line without a stack trace and exits 1', async () => {
    const weather = syntheticWeather();
    const readings = folder.write('r.csv', readingsCsv(syntheticBills(weather, 2022, 24)));
    const weatherFile = folder.write('w.csv', weatherCsv(weather));
    const run = await runCli(['fit', '--readings', readings, '--weather', weatherFile]);
    expect(run.code).toBe(1);
    expect(run.stdout).toBe('');
    expect(run.stderr).toBe('mvledger: internal error: matrix went sideways second line\n'); // no stack frames, one line
  });
});
