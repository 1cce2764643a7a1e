/**
 * Service configuration from the environment, validated once at start. A bad
 * value stops the start with a message naming the variable (never its value
 * when it could be a secret).
 */
import { z } from 'zod';

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
    .regex(/^mvl_[A-Za-z0-9]{8}_[A-Za-z0-9]{32,}$/, 'must look like mvl_<8 letters or digits>_<32 or more letters or digits>')
    .optional(),
});

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
  /** Memory for savings documents kept per data version; 0 computes every request afresh. */
  savingsCacheBytes: number;
}

export class ConfigError extends Error {}

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
    savingsCacheBytes: value.SAVINGS_CACHE_MB * 1024 * 1024,
  };
}
