/**
 * Service configuration from the environment, validated once at start. A bad
 * value stops the start with a message naming the variable (never its value
 * when it could be a secret).
 */
import { readFileSync } from 'node:fs';
import { z } from 'zod';
import { checkpointSigner, type CheckpointSigner } from './lib/checkpoint-signature.js';

const LOG_LEVELS = ['fatal', 'error', 'warn', 'info', 'debug', 'trace', 'silent'] as const;

const environmentSchema = z.object({
  PORT: z.coerce.number().int().min(0).max(65535).default(8080),
  HOST: z.string().min(1).default('127.0.0.1'),
  DATABASE_URL: z.string().min(1).default('sqlite:./var/mvledger.sqlite'),
  LOG_LEVEL: z.enum(LOG_LEVELS).default('info'),
  RATE_LIMIT_PER_MINUTE: z.coerce.number().int().min(0).default(60_000),
  SAVINGS_CACHE_MB: z.coerce.number().int().min(0).max(4096).default(32),
  MAX_BODY_BYTES: z.coerce
    .number()
    .int()
    .min(1024)
    .max(256 * 1024 * 1024)
    .default(16 * 1024 * 1024),
  MVLEDGER_BOOTSTRAP_ORGANISATION: z.string().trim().min(1).max(200).default('Bootstrap organisation'),
  MVLEDGER_BOOTSTRAP_KEY: z
    .string()
    .regex(
      /^mvl_[A-Za-z0-9]{8}_[A-Za-z0-9]{32,}$/,
      'must look like mvl_<8 letters or digits>_<32 or more letters or digits>',
    )
    .refine(
      (key) => secretLooksRandom(key.slice(13)),
      `its secret part looks chosen, not random: generate one (for example \`openssl rand -base64 48 | tr -dc A-Za-z0-9 | head -c 40\`)`,
    )
    .optional(),
  FAILED_AUTH_PER_MINUTE: z.coerce.number().int().min(0).default(30),
  REQUEST_TIMEOUT_MS: z.coerce.number().int().min(1_000).max(3_600_000).default(60_000),
  HEADERS_TIMEOUT_MS: z.coerce.number().int().min(1_000).max(3_600_000).default(15_000),
  MVLEDGER_CHECKPOINT_KEY_FILE: z.string().min(1).optional(),
  MVLEDGER_CHECKPOINT_KEY: z.string().min(1).optional(),
  CHECKPOINT_INTERVAL_SECONDS: z.coerce.number().int().min(0).max(604_800).default(3600),
});

/** Bits a bootstrap key's secret must carry, counted from the characters it draws on (the service's own keys carry 190). */
export const BOOTSTRAP_SECRET_MIN_BITS = 128;

/**
 * Does a bootstrap key's secret look generated rather than typed? A screen
 * against a chosen or patterned secret, not a proof of randomness:
 * - its length × log2 of the alphabet its character classes span (digits,
 *   lower case, upper case) reaches 128 bits;
 * - its characters' empirical (plug-in Shannon) entropy is at least 2.5 bits
 *   each and no character makes up more than 40% of it ("aaaa…", "abcabc…");
 * - it does not repeat with a period of half its length or less
 *   ("password1password1…");
 * - at most 60% of its neighbouring characters are consecutive ("abcd…",
 *   "1234…").
 * The thresholds sit below the extremes of 100,000 random secrets of each
 * kind (32 or 40 hexadecimal or alphanumeric characters; the least random
 * looking: 2.74 bits, 34%, 42%), and the test draws 10,000 of each, seeded.
 */
export function secretLooksRandom(secret: string): boolean {
  const length = secret.length;
  const pool = (/[0-9]/.test(secret) ? 10 : 0) + (/[a-z]/.test(secret) ? 26 : 0) + (/[A-Z]/.test(secret) ? 26 : 0);
  if (pool === 0 || length * Math.log2(pool) < BOOTSTRAP_SECRET_MIN_BITS) return false;
  const counts = new Map<string, number>();
  for (const character of secret) counts.set(character, (counts.get(character) ?? 0) + 1);
  let bitsPerCharacter = 0;
  for (const count of counts.values()) bitsPerCharacter -= (count / length) * Math.log2(count / length);
  if (bitsPerCharacter < 2.5 || Math.max(...counts.values()) > 0.4 * length) return false;
  for (let period = 1; period <= length / 2; period++)
    if (secret.slice(period) === secret.slice(0, length - period)) return false;
  let consecutive = 0;
  for (let i = 1; i < length; i++) if (Math.abs(secret.charCodeAt(i) - secret.charCodeAt(i - 1)) === 1) consecutive++;
  return consecutive <= 0.6 * (length - 1);
}

export interface Config {
  port: number;
  host: string;
  databaseUrl: string;
  logLevel: (typeof LOG_LEVELS)[number];
  bootstrapKey: string | undefined;
  /** Name of the organisation a bootstrap creates. */
  bootstrapOrganisation: string;
  /** Requests per minute per API key (per address without one); 0 turns the limit off. */
  rateLimitPerMinute: number;
  /** Largest accepted request body. */
  maxBodyBytes: number;
  /** Failed authentications per minute per client address before 429; 0 turns the limit off. */
  failedAuthPerMinute: number;
  /** Longest time a whole request may take to arrive, and its headers, in ms. */
  requestTimeoutMs: number;
  headersTimeoutMs: number;
  /** Memory for savings documents kept per data version; 0 computes every request afresh. */
  savingsCacheBytes: number;
  /** Signs audit checkpoints (lib/checkpoint-signature.ts); absent when no checkpoint key is configured. */
  checkpointSigner: CheckpointSigner | undefined;
  /** Seconds between rounds of the periodic checkpoint signer; 0 signs only on statements and on request. */
  checkpointIntervalSeconds: number;
}

export class ConfigError extends Error {}

/**
 * The checkpoint key: a PEM Ed25519 private key, from the file named by
 * MVLEDGER_CHECKPOINT_KEY_FILE or in MVLEDGER_CHECKPOINT_KEY itself (for a
 * container secret). Never both; the message never repeats the key.
 */
function loadCheckpointSigner(file: string | undefined, inline: string | undefined): CheckpointSigner | undefined {
  if (file !== undefined && inline !== undefined)
    throw new ConfigError(
      'invalid configuration: set MVLEDGER_CHECKPOINT_KEY_FILE or MVLEDGER_CHECKPOINT_KEY, not both',
    );
  if (file === undefined && inline === undefined) return undefined;
  const variable = file !== undefined ? 'MVLEDGER_CHECKPOINT_KEY_FILE' : 'MVLEDGER_CHECKPOINT_KEY';
  let pem: string;
  try {
    pem = file !== undefined ? readFileSync(file, 'utf8') : inline!;
  } catch (error) {
    throw new ConfigError(
      `invalid configuration: ${variable}: cannot read the file (${(error as NodeJS.ErrnoException).code ?? 'error'})`,
    );
  }
  try {
    return checkpointSigner(pem);
  } catch (error) {
    throw new ConfigError(`invalid configuration: ${variable}: ${(error as Error).message}`);
  }
}

/** Read and validate the configuration; throws ConfigError naming every bad variable. */
export function loadConfig(env: NodeJS.ProcessEnv = process.env): Config {
  const parsed = environmentSchema.safeParse(env);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((issue) => `${issue.path.join('.')}: ${issue.message}`);
    throw new ConfigError(`invalid configuration: ${lines.join('; ')}`);
  }
  const value = parsed.data;
  return {
    port: value.PORT,
    host: value.HOST,
    databaseUrl: value.DATABASE_URL,
    logLevel: value.LOG_LEVEL,
    bootstrapKey: value.MVLEDGER_BOOTSTRAP_KEY,
    bootstrapOrganisation: value.MVLEDGER_BOOTSTRAP_ORGANISATION,
    rateLimitPerMinute: value.RATE_LIMIT_PER_MINUTE,
    maxBodyBytes: value.MAX_BODY_BYTES,
    failedAuthPerMinute: value.FAILED_AUTH_PER_MINUTE,
    requestTimeoutMs: value.REQUEST_TIMEOUT_MS,
    headersTimeoutMs: value.HEADERS_TIMEOUT_MS,
    savingsCacheBytes: value.SAVINGS_CACHE_MB * 1024 * 1024,
    checkpointSigner: loadCheckpointSigner(value.MVLEDGER_CHECKPOINT_KEY_FILE, value.MVLEDGER_CHECKPOINT_KEY),
    checkpointIntervalSeconds: value.CHECKPOINT_INTERVAL_SECONDS,
  };
}
