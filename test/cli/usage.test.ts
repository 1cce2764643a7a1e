/**
 * Help and option checking. Sources of the check values: the expected texts
 * and exit codes are the CLI's own contract (src/cli/main.ts, options.ts,
 * usage.ts); the shape names and confidence levels are the engine's
 * MODEL_NAMES and CONFIDENCE_LEVELS.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { runCli } from './helpers.js';

describe('help and usage', () => {
  for (const args of [[], ['help'], ['--help'], ['-h']]) {
    it(`prints the usage for ${JSON.stringify(args)} and exits 0`, async () => {
      const run = await runCli(args);
      expect(run.code).toBe(0);
      expect(run.stderr).toBe('');
      expect(run.stdout).toContain('mvledger fit --readings FILE --weather FILE');
      expect(run.stdout).toContain('mvledger savings --baseline FILE --reporting FILE --weather FILE');
    });
  }

  it('prints one command’s usage for `fit --help` and `help savings`', async () => {
    const fit = await runCli(['fit', '--help']);
    expect(fit.code).toBe(0);
    expect(fit.stdout).toMatch(/^Usage: mvledger fit/);
    const savings = await runCli(['help', 'savings']);
    expect(savings.stdout).toMatch(/^Usage: mvledger savings/);
    expect(savings.stdout).toContain('0.68, 0.8, 0.9, 0.95'); // the engine's CONFIDENCE_LEVELS
  });

  it('mvledger --version was an unknown command: it prints the package version', async () => {
    const { version } = JSON.parse(readFileSync(new URL('../../package.json', import.meta.url), 'utf8')) as {
      version: string;
    };
    for (const word of ['--version', '-V', 'version']) {
      const run = await runCli([word]);
      expect(run.code).toBe(0);
      expect(run.stderr).toBe('');
      expect(run.stdout).toBe(`mvledger ${version}\n`); // package.json, the one source of the version
    }
  });

  it('refuses an unknown command with exit code 2', async () => {
    const run = await runCli(['fitt']);
    expect(run.code).toBe(2);
    expect(run.stdout).toBe('');
    expect(run.stderr).toBe(
      'mvledger: unknown command "fitt" (commands: fit, savings, weather, keys, export, import, backup, restore, verify, help)\n',
    );
  });
});

describe('bad options', () => {
  const cases: { args: string[]; says: string }[] = [
    { args: ['fit', '--weather', 'w.csv'], says: 'mvledger: --readings FILE is required\n' },
    { args: ['fit', '--readings', 'r.csv'], says: 'mvledger: --weather FILE is required\n' },
    {
      args: ['fit', '--readings', 'r.csv', '--weather', 'w.csv', '--colour'],
      says: 'mvledger: unknown option --colour\n',
    },
    {
      args: ['fit', '--readings', 'r.csv', '--weather', 'w.csv', 'extra'],
      says: 'mvledger: unexpected argument extra\n',
    },
    { args: ['fit', '--readings'], says: 'mvledger: option --readings needs a value\n' },
    {
      args: ['fit', '--readings', 'r.csv', '--weather', 'w.csv', '--unit', 'K'],
      says: 'mvledger: --unit must be F or C, got "K"\n',
    },
    {
      args: ['fit', '--readings', 'r.csv', '--weather', 'w.csv', '--coverage', '1.5'],
      says: 'mvledger: --coverage must be a fraction in (0, 1], e.g. 0.9, got "1.5"\n',
    },
    {
      args: ['fit', '--readings', 'r.csv', '--weather', 'w.csv', '--alpha', 'x'],
      says: 'mvledger: --alpha must be a level in (0, 1), e.g. 0.05, got "x"\n',
    },
    {
      args: ['fit', '--readings', 'r.csv', '--weather', 'w.csv', '--min-points', '2.5'],
      says: 'mvledger: --min-points must be a whole number from 1 to 1000, got "2.5"\n',
    },
    // our own bound (src/engine/bounds.ts), the same as the API's
    {
      args: ['fit', '--readings', 'r.csv', '--weather', 'w.csv', '--min-points', '1e300'],
      says: 'mvledger: --min-points must be a whole number from 1 to 1000, got "1e300"\n',
    },
    {
      args: ['savings', '--baseline', 'b.csv', '--reporting', 'r.csv', '--weather', 'w.csv', '--model', '6P'],
      says: 'mvledger: --model must be one of 1P, 2P, 3PC, 3PH, 4P, 5P, got "6P"\n',
    },
    {
      args: ['savings', '--baseline', 'b.csv', '--reporting', 'r.csv', '--weather', 'w.csv', '--confidence', '68'],
      says: 'mvledger: --confidence must be one of 0.68, 0.8, 0.9, 0.95, got "68"\n',
    },
    {
      args: ['savings', '--baseline', 'b.csv', '--weather', 'w.csv'],
      says: 'mvledger: --reporting FILE is required\n',
    },
    {
      args: ['fit', '--readings', 'r.csv', '--weather', 'w.csv', '--temperature', 'hourly'],
      says: 'mvledger: --temperature must be daily or mean, got "hourly"\n',
    },
    {
      args: ['savings', '--baseline', 'b.csv', '--reporting', 'r.csv', '--weather', 'w.csv', '--temperature', ''],
      says: 'mvledger: --temperature must be daily or mean, got ""\n',
    },
    {
      args: ['savings', '--baseline', 'b.csv', '--reporting', 'r.csv', '--weather', 'w.csv', '--allow-extrapolation'],
      says: 'mvledger: option --allow-extrapolation needs a value\n',
    },
    {
      args: ['fit', '--readings', 'r.csv', '--weather', 'w.csv', '--allow-short-baseline', 'x'],
      says: 'mvledger: unknown option --allow-short-baseline\n',
    },
  ];
  for (const c of cases) {
    it(`refuses ${c.args.slice(1).join(' ')}`, async () => {
      // The options are checked before any file is read, so the named files need not exist.
      const run = await runCli(c.args);
      expect(run.code).toBe(2);
      expect(run.stdout).toBe('');
      expect(run.stderr).toBe(c.says);
    });
  }
});
