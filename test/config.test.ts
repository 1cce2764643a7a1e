/**
 * Service configuration from the environment. Check values: the defaults
 * documented in src/config.ts and the contract that a bad value is a
 * ConfigError naming the variable, never echoing a secret.
 */
import { describe, expect, it } from 'vitest';
import { ConfigError, loadConfig } from '../src/config.js';

const BOOTSTRAP = `mvl_Abcd1234_${'Q'.repeat(32)}`; // synthetic: right shape, invented

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
});
