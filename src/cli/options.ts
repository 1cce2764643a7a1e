/**
 * Command-line options of `fit` and `savings`, checked before any file is
 * read: every bad value is a UsageError (exit code 2).
 */
import { parseArgs } from 'node:util';
import {
  isUsableSignificanceLevel,
  CONFIDENCE_LEVELS,
  DEFAULT_MIN_COVERAGE,
  DEFAULT_MIN_POINTS_PER_SEGMENT,
  DEFAULT_SIGNIFICANCE_LEVEL,
  MAX_POINTS_PER_SEGMENT,
  MODEL_NAMES,
  SIGNIFICANCE_RULE,
  TEMPERATURE_FORMS,
  type ModelName,
  type TemperatureForm,
  type TemperatureUnit,
} from '../engine/index.js';
import { describeParseError, UsageError } from './errors.js';

export interface CommonOptions {
  weather: string;
  json: boolean;
  unit: TemperatureUnit;
  minCoverage: number;
  significanceLevel: number;
  minPointsPerSegment: number;
  /** How each reading's weather enters the fit; null: the engine's default (day-resolved wherever the days' weather is known). */
  temperatureForm: TemperatureForm | null;
  /** CSV of independent variables (a date or start,end column, one column per variable) offered to the fit; null for none. */
  variables: string | null;
}

export interface FitOptions extends CommonOptions {
  readings: string;
  /** One readings file with a meter column: fit every meter, one output line or row per meter. */
  batch: boolean;
  /** CSV of baseline readings to leave out (start, end, reason); null for none. */
  exclusions: string | null;
}

export interface SavingsCommandOptions extends CommonOptions {
  baseline: string;
  reporting: string;
  confidence: number;
  /** The engineer's choice of shape, overriding the selected one. */
  model: ModelName | null;
  /** The reason for projecting from a baseline shorter than a full cycle of seasons (else refused). */
  allowShortBaseline: string | null;
  /** The reason for projecting beyond the extrapolation limit (else refused). */
  allowExtrapolation: string | null;
}

export type Parsed<T> = { help: true } | ({ help: false } & T);

const COMMON_SPEC = {
  weather: { type: 'string' },
  variables: { type: 'string' },
  json: { type: 'boolean' },
  unit: { type: 'string' },
  coverage: { type: 'string' },
  alpha: { type: 'string' },
  'min-points': { type: 'string' },
  temperature: { type: 'string' },
  help: { type: 'boolean', short: 'h' },
} as const;

const FIT_SPEC = {
  ...COMMON_SPEC,
  readings: { type: 'string' },
  batch: { type: 'boolean' },
  exclusions: { type: 'string' },
} as const;

const SAVINGS_SPEC = {
  ...COMMON_SPEC,
  baseline: { type: 'string' },
  reporting: { type: 'string' },
  confidence: { type: 'string' },
  model: { type: 'string' },
  'allow-short-baseline': { type: 'string' },
  'allow-extrapolation': { type: 'string' },
} as const;

type Values = Record<string, string | boolean | undefined>;

export function parseFitOptions(args: readonly string[]): Parsed<FitOptions> {
  const values = parseStrict(args, FIT_SPEC);
  if (values.help) return { help: true };
  if (values.batch === true && typeof values.exclusions === 'string')
    throw new UsageError('--exclusions names readings of one meter: leave it out with --batch');
  return {
    help: false,
    readings: requireFile(values, 'readings'),
    batch: values.batch === true,
    exclusions: typeof values.exclusions === 'string' ? requireFile(values, 'exclusions') : null,
    ...commonOptions(values),
  };
}

export function parseSavingsOptions(args: readonly string[]): Parsed<SavingsCommandOptions> {
  const values = parseStrict(args, SAVINGS_SPEC);
  if (values.help) return { help: true };
  return {
    help: false,
    baseline: requireFile(values, 'baseline'),
    reporting: requireFile(values, 'reporting'),
    confidence: confidenceOption(values.confidence),
    model: modelOption(values.model),
    allowShortBaseline: reasonOption(values['allow-short-baseline'], 'allow-short-baseline'),
    allowExtrapolation: reasonOption(values['allow-extrapolation'], 'allow-extrapolation'),
    ...commonOptions(values),
  };
}

function parseStrict(args: readonly string[], options: typeof FIT_SPEC | typeof SAVINGS_SPEC): Values {
  try {
    return parseArgs({ args: [...args], options, strict: true, allowPositionals: false }).values as Values;
  } catch (error) {
    throw new UsageError(describeParseError(error));
  }
}

function commonOptions(values: Values): CommonOptions {
  return {
    weather: requireFile(values, 'weather'),
    json: values.json === true,
    unit: unitOption(values.unit),
    minCoverage: numberOption(
      values.coverage,
      'coverage',
      DEFAULT_MIN_COVERAGE,
      (v) => v > 0 && v <= 1,
      'a fraction in (0, 1], e.g. 0.9',
    ),
    significanceLevel: numberOption(
      values.alpha,
      'alpha',
      DEFAULT_SIGNIFICANCE_LEVEL,
      isUsableSignificanceLevel,
      'a level in (0, 1), e.g. 0.05',
    ),
    minPointsPerSegment: numberOption(
      values['min-points'],
      'min-points',
      DEFAULT_MIN_POINTS_PER_SEGMENT,
      (v) => Number.isInteger(v) && v >= 1 && v <= MAX_POINTS_PER_SEGMENT,
      `a whole number from 1 to ${MAX_POINTS_PER_SEGMENT}`,
    ),
    temperatureForm: temperatureOption(values.temperature),
    variables: typeof values.variables === 'string' ? requireFile(values, 'variables') : null,
  };
}

function temperatureOption(value: string | boolean | undefined): TemperatureForm | null {
  if (value === undefined) return null;
  const form = TEMPERATURE_FORMS.find((f) => f === String(value).toLowerCase());
  if (!form)
    throw new UsageError(`--temperature must be ${TEMPERATURE_FORMS.join(' or ')}, got ${JSON.stringify(value)}`);
  return form;
}

/** An override's reason: required text, on one line, at most 2,000 characters. */
function reasonOption(value: string | boolean | undefined, name: string): string | null {
  if (value === undefined) return null;
  const reason = String(value).replace(/\s+/g, ' ').trim();
  if (reason === '') throw new UsageError(`--${name} needs a REASON: say why the check may be passed over`);
  if (reason.length > 2000)
    throw new UsageError(`--${name}: the reason must be at most 2000 characters, got ${reason.length}`);
  return reason;
}

function requireFile(values: Values, name: string): string {
  const value = values[name];
  if (typeof value !== 'string' || value === '') throw new UsageError(`--${name} FILE is required`);
  return value;
}

function unitOption(value: string | boolean | undefined): TemperatureUnit {
  if (value === undefined) return 'F';
  const unit = String(value).toUpperCase();
  if (unit === 'F' || unit === 'C') return unit;
  throw new UsageError(`--unit must be F or C, got ${JSON.stringify(value)}`);
}

function numberOption(
  value: string | boolean | undefined,
  name: string,
  fallback: number,
  valid: (v: number) => boolean,
  expected: string,
): number {
  if (value === undefined) return fallback;
  const text = String(value).trim();
  const number = text === '' ? Number.NaN : Number(text);
  if (!Number.isFinite(number) || !valid(number))
    throw new UsageError(`--${name} must be ${expected}, got ${JSON.stringify(value)}`);
  return number;
}

function confidenceOption(value: string | boolean | undefined): number {
  const allowed: readonly number[] = CONFIDENCE_LEVELS;
  const confidence = numberOption(
    value,
    'confidence',
    SIGNIFICANCE_RULE.confidence,
    (v) => allowed.includes(v),
    `one of ${allowed.join(', ')}`,
  );
  return confidence;
}

function modelOption(value: string | boolean | undefined): ModelName | null {
  if (value === undefined) return null;
  const name = String(value).toUpperCase();
  const model = MODEL_NAMES.find((m) => m === name);
  if (!model) throw new UsageError(`--model must be one of ${MODEL_NAMES.join(', ')}, got ${JSON.stringify(value)}`);
  return model;
}
