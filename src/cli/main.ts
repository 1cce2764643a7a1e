/**
 * The `mvledger` command line. Library code: it writes only through `io` and
 * returns the exit code (0 ok, 2 bad usage, input or a ledger rule's refusal,
 * 3 database not available, 1 internal error), so
 * tests can run it in-process. bin/mvledger.js is the thin launcher.
 */
import { EXIT_BAD_INPUT, EXIT_CODE_OF, EXIT_INTERNAL, InputFileError, UsageError, oneLine } from './errors.js';
import { DomainError } from '../domain/errors.js';
import { parseFitOptions, parseSavingsOptions } from './options.js';
import { runFit } from './commands/fit.js';
import { runSavings } from './commands/savings.js';
import { runKeys } from './commands/keys.js';
import { runExport, runImport } from './commands/transfer.js';
import { runBackup, runRestore } from './commands/backup.js';
import { runWeather } from './commands/weather.js';
import { runVerify } from './commands/verify.js';
import {
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
} from './usage.js';
import { packageVersion } from './version.js';

export interface CliIO {
  stdout(text: string): void;
  stderr(text: string): void;
}

const HELP_WORDS = new Set(['help', '--help', '-h']);
const VERSION_WORDS = new Set(['--version', '-V', 'version']);

export async function main(argv: string[], io: CliIO): Promise<number> {
  const [command, ...rest] = argv;
  try {
    if (command === undefined || HELP_WORDS.has(command)) {
      io.stdout(helpFor(rest[0]));
      return 0;
    }
    if (VERSION_WORDS.has(command)) {
      io.stdout(`mvledger ${packageVersion()}\n`);
      return 0;
    }
    if (command === 'fit') {
      const options = parseFitOptions(rest);
      // The whole output is built first: on an error stdout stays empty.
      io.stdout(options.help ? FIT_USAGE : await runFit(options));
      return 0;
    }
    if (command === 'savings') {
      const options = parseSavingsOptions(rest);
      io.stdout(options.help ? SAVINGS_USAGE : await runSavings(options));
      return 0;
    }
    if (command === 'keys') {
      if (rest.some((word) => HELP_WORDS.has(word))) {
        io.stdout(KEYS_USAGE);
        return 0;
      }
      const output = await runKeys(rest);
      io.stdout(output.stdout);
      if (output.note) io.stderr(output.note);
      return 0;
    }
    if (command === 'export' || command === 'import') {
      // The whole document is built and checked first: on an error stdout stays empty.
      const output = command === 'export' ? await runExport(rest) : await runImport(rest);
      io.stdout(output.stdout);
      if (output.note) io.stderr(output.note);
      return 0;
    }
    if (command === 'backup' || command === 'restore') {
      const output = command === 'backup' ? await runBackup(rest) : await runRestore(rest);
      io.stdout(output.stdout);
      if (output.note) io.stderr(output.note);
      return output.code ?? 0;
    }
    if (command === 'weather') {
      if (rest.some((word) => HELP_WORDS.has(word))) {
        io.stdout(WEATHER_USAGE);
        return 0;
      }
      const output = await runWeather(rest);
      io.stdout(output.stdout);
      if (output.note) io.stderr(output.note);
      return 0;
    }
    if (command === 'verify') {
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

function helpFor(topic: string | undefined): string {
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
