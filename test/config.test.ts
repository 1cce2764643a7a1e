/**
 * Service configuration from the environment. Check values: the defaults
 * documented in src/config.ts and the contract that a bad value is a
 * ConfigError naming the variable, never echoing a secret.
 */
import { describe, expect, it } from 'vitest';
import { createHash } from 'node:crypto';
import { ConfigError, loadConfig, secretLooksRandom } from '../src/config.js';

const BOOTSTRAP = 'mvl_Abcd1234_BlOc5FLB03GmnyvIxkwaSCvvDWsv5BSLgyYHopcS'; // synthetic: a secret drawn once by crypto.randomBytes

describe('loadConfig', () => {
  it('falls back to the documented defaults', () => {
    expect(loadConfig({})).toEqual({
      port: 8080,
      host: '127.0.0.1',
      databaseUrl: 'sqlite:./var/mvledger.sqlite',
      logLevel: 'info',
      bootstrapKey: undefined,
      bootstrapOrganisation: 'Bootstrap organisation',
      rateLimitPerMinute: 60_000,
      maxBodyBytes: 16 * 1024 * 1024,
      failedAuthPerMinute: 30,
      requestTimeoutMs: 60_000,
      headersTimeoutMs: 15_000,
      savingsCacheBytes: 32 * 1024 * 1024,
      checkpointSigner: undefined,
      checkpointIntervalSeconds: 3600,
    });
  });

  it('reads every variable', () => {
    const config = loadConfig({
      PORT: '9001',
      HOST: '0.0.0.0',
      DATABASE_URL: 'sqlite::memory:',
      LOG_LEVEL: 'debug',
      MVLEDGER_BOOTSTRAP_KEY: BOOTSTRAP,
      RATE_LIMIT_PER_MINUTE: '0',
      MAX_BODY_BYTES: '65536',
      FAILED_AUTH_PER_MINUTE: '5',
      REQUEST_TIMEOUT_MS: '20000',
      HEADERS_TIMEOUT_MS: '5000',
      SAVINGS_CACHE_MB: '0',
      CHECKPOINT_INTERVAL_SECONDS: '0',
    });
    expect(config).toEqual({
      port: 9001,
      host: '0.0.0.0',
      databaseUrl: 'sqlite::memory:',
      logLevel: 'debug',
      bootstrapKey: BOOTSTRAP,
      bootstrapOrganisation: 'Bootstrap organisation',
      rateLimitPerMinute: 0,
      maxBodyBytes: 65536,
      failedAuthPerMinute: 5,
      requestTimeoutMs: 20_000,
      headersTimeoutMs: 5_000,
      savingsCacheBytes: 0,
      checkpointSigner: undefined, // the key variables: test/http/audit-checkpoints.test.ts
      checkpointIntervalSeconds: 0,
    });
  });

  const bad: { env: Record<string, string>; names: string }[] = [
    { env: { PORT: 'abc' }, names: 'PORT' },
    { env: { PORT: '70000' }, names: 'PORT' },
    { env: { PORT: '80.5' }, names: 'PORT' },
    { env: { LOG_LEVEL: 'loud' }, names: 'LOG_LEVEL' },
    { env: { HOST: '' }, names: 'HOST' },
    { env: { DATABASE_URL: '' }, names: 'DATABASE_URL' },
    { env: { RATE_LIMIT_PER_MINUTE: '-1' }, names: 'RATE_LIMIT_PER_MINUTE' },
    { env: { MAX_BODY_BYTES: '12' }, names: 'MAX_BODY_BYTES' },
    { env: { FAILED_AUTH_PER_MINUTE: '-3' }, names: 'FAILED_AUTH_PER_MINUTE' },
    { env: { REQUEST_TIMEOUT_MS: '10' }, names: 'REQUEST_TIMEOUT_MS' },
    { env: { HEADERS_TIMEOUT_MS: 'soon' }, names: 'HEADERS_TIMEOUT_MS' },
  ];
  for (const c of bad) {
    it(`refuses ${JSON.stringify(c.env)} with a ConfigError naming ${c.names}`, () => {
      expect(() => loadConfig(c.env)).toThrow(ConfigError);
      expect(() => loadConfig(c.env)).toThrow(c.names);
    });
  }

  it('names a malformed bootstrap key without echoing it', () => {
    const secret = `mvl_short_${'S3cr3tPart'.repeat(4)}`; // synthetic: the id part is too short
    let message = '';
    try {
      loadConfig({ MVLEDGER_BOOTSTRAP_KEY: secret });
    } catch (error) {
      expect(error).toBeInstanceOf(ConfigError);
      message = (error as Error).message;
    }
    expect(message).toContain('MVLEDGER_BOOTSTRAP_KEY');
    expect(message).not.toContain('S3cr3tPart');
  });

  it('names every bad variable at once', () => {
    expect(() => loadConfig({ PORT: 'abc', LOG_LEVEL: 'loud' })).toThrow(/PORT.*LOG_LEVEL|LOG_LEVEL.*PORT/);
  });

  // synthetic: secrets a person might type; each has the right shape and length for the format check.
  const weak = [
    'k'.repeat(40),
    'Q'.repeat(32),
    'abc'.repeat(11),
    'password1'.repeat(4),
    'abcdefghijklmnopqrstuvwxyz0123456789',
    'aaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaab',
    'Abcd1234'.repeat(4),
  ];
  for (const secret of weak) {
    it(`refuses the typed bootstrap secret ${secret.slice(0, 12)}… without echoing it`, () => {
      expect(secretLooksRandom(secret)).toBe(false);
      let message = '';
      try {
        loadConfig({ MVLEDGER_BOOTSTRAP_KEY: `mvl_Abcd1234_${secret}` });
      } catch (error) {
        expect(error).toBeInstanceOf(ConfigError);
        message = (error as Error).message;
      }
      expect(message).toContain('MVLEDGER_BOOTSTRAP_KEY: its secret part looks chosen');
      expect(message).not.toContain(secret);
    });
  }

  it('accepts every random secret of the documented kinds (10,000 each, seeded)', () => {
    // Seeded simulation: SHA-256 in counter mode stands in for a random source, so the draw repeats.
    const alphabets = {
      hex: '0123456789abcdef',
      alphanumeric: 'ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789',
    };
    let counter = 0;
    const draw = (alphabet: string, length: number) => {
      let out = '';
      while (out.length < length) {
        for (const byte of createHash('sha256').update(`key-${counter++}`).digest()) {
          // Rejection sampling keeps each character uniform.
          if (byte < 256 - (256 % alphabet.length) && out.length < length) out += alphabet[byte % alphabet.length];
        }
      }
      return out;
    };
    const refused: string[] = [];
    for (const [name, alphabet] of Object.entries(alphabets)) {
      for (const length of [32, 40]) {
        for (let i = 0; i < 10_000; i++) {
          const secret = draw(alphabet, length);
          if (!secretLooksRandom(secret)) refused.push(`${name} ${length}: ${secret}`);
        }
      }
    }
    expect(refused).toEqual([]);
  });
});
