import { describe, expect, it } from 'vitest';
import { ConfigError, loadConfig } from '../../server/config';

describe('loadConfig', () => {
  it('has a working default for every setting', () => {
    const config = loadConfig({});
    expect(config).toMatchObject({
      env: 'development',
      host: '127.0.0.1',
      port: 8470,
      publicUrl: 'http://127.0.0.1:8470',
      databaseUrl: 'postgres://isobar@127.0.0.1:54470/isobar',
      jsonBodyLimit: '1mb',
    });
  });

  it('reads overrides from the environment, treating empty values as unset', () => {
    const config = loadConfig({ PORT: '9000', PUBLIC_URL: 'https://cath.example/', HOST: '' });
    expect(config.port).toBe(9000);
    expect(config.host).toBe('127.0.0.1');
    expect(config.publicUrl).toBe('https://cath.example');
  });

  it.each([
    ['PORT', 'eighty', 'PORT'],
    ['PORT', '70000', 'PORT'],
    ['DATABASE_URL', 'mysql://x', 'DATABASE_URL'],
    ['NODE_ENV', 'staging', 'NODE_ENV'],
    ['JSON_BODY_LIMIT', 'lots', 'JSON_BODY_LIMIT'],
    ['SESSION_SECRET', 'short', 'SESSION_SECRET'],
  ])('fails fast on a bad %s (%s), naming the variable', (name, value, named) => {
    expect(() => loadConfig({ [name]: value })).toThrow(ConfigError);
    expect(() => loadConfig({ [name]: value })).toThrow(new RegExp(named));
  });

  it('refuses the development session secret in production', () => {
    expect(() => loadConfig({ NODE_ENV: 'production' })).toThrow(/SESSION_SECRET: must be set in production/);
  });
});
