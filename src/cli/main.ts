/**
 * The `mvledger` command line. Library code: it writes only through `io` and
 * returns the exit code (0 ok, 2 bad usage, input or a ledger rule's refusal,
 * 3 database not available, 1 internal error), so
 * tests can run it in-process. bin/mvledger.js is the thin launcher.
 */
import { EXIT_BAD_INPUT, EXIT_CODE_OF, EXIT_INTERNAL, InputFileError, UsageError, oneLine } from './errors.js';
import { DomainError } from '../domain/errors.js';
import type { CliIO } from './io.js';
import { packageVersion } from './version.js';

// Each command imports what it needs when it runs: `fit` and `savings` load the
// engine and the CSV reader only, never the database drivers or the service.

export type { CliIO } from './io.js';

const HELP_WORDS = new Set(['help', '--help', '-h']);
const VERSION_WORDS = new Set(['--version', '-V', 'version']);

export async function main(argv: string[], io: CliIO): Promise<number> {
  const [command, ...rest] = argv;
  try {
    if (command === undefined || HELP_WORDS.has(command)) {
      io.stdout(await helpFor(rest[0]));
      return 0;
    }
    if (VERSION_WORDS.has(command)) {
      io.stdout(`mvledger ${packageVersion()}\n`);
      return 0;
    }
    if (command === 'fit') {
      const { parseFitOptions } = await import('./options.js');
      const options = parseFitOptions(rest);
      if (options.help) {
        io.stdout((await import('./usage.js')).FIT_USAGE);
        return 0;
      }
      if (options.batch) {
        const { runFitBatch } = await import('./commands/fit-batch.js');
        // Batch output is written as each meter is fitted; a bad file stops it before the first line.
        const outcome = await runFitBatch(options, io);
        return outcome.failed > 0 ? EXIT_BAD_INPUT : 0;
      }
      const { runFit } = await import('./commands/fit.js');
      // The whole output is built first: on an error stdout stays empty.
      io.stdout(await runFit(options));
      return 0;
    }
    if (command === 'savings') {
      const { parseSavingsOptions } = await import('./options.js');
      const options = parseSavingsOptions(rest);
      if (options.help) {
        io.stdout((await import('./usage.js')).SAVINGS_USAGE);
        return 0;
      }
      const { runSavings } = await import('./commands/savings.js');
      io.stdout(await runSavings(options));
      return 0;
    }
    if (command === 'keys') {
      if (rest.some((word) => HELP_WORDS.has(word))) {
        io.stdout((await import('./usage.js')).KEYS_USAGE);
        return 0;
      }
      const { runKeys } = await import('./commands/keys.js');
      const output = await runKeys(rest);
      io.stdout(output.stdout);
      if (output.note) io.stderr(output.note);
      return 0;
    }
    if (command === 'export' || command === 'import') {
      // The whole document is built and checked first: on an error stdout stays empty.
      const { runExport, runImport } = await import('./commands/transfer.js');
      const output = command === 'export' ? await runExport(rest) : await runImport(rest);
      io.stdout(output.stdout);
      if (output.note) io.stderr(output.note);
      return 0;
    }
    if (command === 'backup' || command === 'restore') {
      const { runBackup, runRestore } = await import('./commands/backup.js');
      const output = command === 'backup' ? await runBackup(rest) : await runRestore(rest);
      io.stdout(output.stdout);
      if (output.note) io.stderr(output.note);
      return output.code ?? 0;
    }
    if (command === 'weather') {
      if (rest.some((word) => HELP_WORDS.has(word))) {
        io.stdout((await import('./usage.js')).WEATHER_USAGE);
        return 0;
      }
      const { runWeather } = await import('./commands/weather.js');
      const output = await runWeather(rest);
      io.stdout(output.stdout);
      if (output.note) io.stderr(output.note);
      return 0;
    }
    if (command === 'verify') {
      const { runVerify } = await import('./commands/verify.js');
      const output = await runVerify(rest);
      io.stdout(output.stdout);
      return output.code;
    }
    io.stderr(
      `mvledger: unknown command ${JSON.stringify(command)} (commands: fit, savings, weather, keys, export, import, backup, restore, verify, help)\n`,
    );
    return EXIT_BAD_INPUT;
  } catch (error) {
    if (error instanceof UsageError || error instanceof InputFileError) {
      io.stderr(`mvledger: ${oneLine(error.message)}\n`);
      return EXIT_BAD_INPUT;
    }
    if (error instanceof DomainError) {
      io.stderr(`mvledger: ${oneLine(error.detail)}\n`);
      return EXIT_CODE_OF[error.kind];
    }
    const message = error instanceof Error ? error.message : String(error);
    io.stderr(`mvledger: internal error: ${oneLine(message)}\n`);
    return EXIT_INTERNAL;
  }
}

async function helpFor(topic: string | undefined): Promise<string> {
  const {
    BACKUP_USAGE,
    EXPORT_USAGE,
    FIT_USAGE,
    GENERAL_USAGE,
    IMPORT_USAGE,
    KEYS_USAGE,
    RESTORE_USAGE,
    SAVINGS_USAGE,
    VERIFY_USAGE,
    WEATHER_USAGE,
  } = await import('./usage.js');
  if (topic === 'fit') return FIT_USAGE;
  if (topic === 'savings') return SAVINGS_USAGE;
  if (topic === 'keys') return KEYS_USAGE;
  if (topic === 'export') return EXPORT_USAGE;
  if (topic === 'import') return IMPORT_USAGE;
  if (topic === 'backup') return BACKUP_USAGE;
  if (topic === 'restore') return RESTORE_USAGE;
  if (topic === 'weather') return WEATHER_USAGE;
  if (topic === 'verify') return VERIFY_USAGE;
  return GENERAL_USAGE;
}
