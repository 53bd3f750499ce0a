import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { ConfigError, loadConfig } from '../../server/config';

describe('loadConfig', () => {
  it('gives the embedded defaults', () => {
    const c = loadConfig({});
    expect(c.port).toBe(3000);
    expect(c.databaseUrl).toBe('sqlite:data/rholog.sqlite');
    expect(c.demoData).toBe(true);
    expect(c.maxUploadBytes).toBe(20 * 1024 * 1024);
    expect(c.uploadDir).toBe(path.resolve('uploads'));
    expect(c.client).toBe('vite');
  });

  it('reads PORT, DATABASE_URL and DEMO_DATA=off', () => {
    const c = loadConfig({ PORT: '4100', DATABASE_URL: 'postgres://u:p@127.0.0.1:5432/db', DEMO_DATA: 'off', NODE_ENV: 'production' });
    expect(c).toMatchObject({ port: 4100, databaseUrl: 'postgres://u:p@127.0.0.1:5432/db', demoData: false, client: 'static' });
  });

  it('stops with a readable list of every bad value', () => {
    let err: unknown;
    try {
      loadConfig({ PORT: 'abc', DATABASE_URL: 'mysql://x', DEMO_DATA: 'maybe' });
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(ConfigError);
    const message = (err as Error).message;
    expect(message).toContain('PORT: must be a whole number from 0 to 65535');
    expect(message).toContain('DATABASE_URL: must start with sqlite: or postgres://');
    expect(message).toContain('DEMO_DATA: must be on or off');
  });
});
