import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { ConfigError, loadConfig } from '../../server/config';

describe('loadConfig', () => {
  it('gives the embedded defaults: production, on loopback while the demo data is on', () => {
    const c = loadConfig({});
    expect(c.port).toBe(3000);
    expect(c.databaseUrl).toBe('sqlite:data/rholog.sqlite');
    expect(c.demoData).toBe(true);
    expect(c.maxUploadBytes).toBe(20 * 1024 * 1024);
    expect(c.uploadDir).toBe(path.resolve('uploads'));
    expect(c.env).toBe('production');
    expect(c.client).toBe('static');
    expect(c.host).toBe('127.0.0.1');
    expect(c.trustProxyHops).toBe(0);
    expect(c.scryptCost).toBe(32768);
    expect(c.session).toEqual({ idleMs: 12 * 3_600_000, absoluteMs: 7 * 86_400_000 });
  });

  it('runs as development only when NODE_ENV says so', () => {
    expect(loadConfig({ NODE_ENV: 'development' })).toMatchObject({ env: 'development', client: 'vite' });
  });

  it('listens on every address by default only without demo data, and always where HOST says', () => {
    expect(loadConfig({ DEMO_DATA: 'off' }).host).toBe('0.0.0.0');
    expect(loadConfig({ DEMO_DATA: 'on', HOST: '0.0.0.0' }).host).toBe('0.0.0.0');
    expect(loadConfig({ DEMO_DATA: 'off', HOST: '10.1.2.3' }).host).toBe('10.1.2.3');
  });

  it('reads TRUST_PROXY as a count of proxies, with on and off kept', () => {
    expect(loadConfig({ TRUST_PROXY: 'off' }).trustProxyHops).toBe(0);
    expect(loadConfig({ TRUST_PROXY: 'on' }).trustProxyHops).toBe(1);
    expect(loadConfig({ TRUST_PROXY: '2' }).trustProxyHops).toBe(2);
    expect(() => loadConfig({ TRUST_PROXY: 'yes' })).toThrow('TRUST_PROXY: must be a number of proxies in front (0, 1, 2…) or on/off');
  });

  it('takes the scrypt cost as a power of two and the session lifetimes in hours and days', () => {
    expect(loadConfig({ SCRYPT_COST: '1024', SESSION_IDLE_HOURS: '2', SESSION_MAX_DAYS: '1' })).toMatchObject({
      scryptCost: 1024,
      session: { idleMs: 2 * 3_600_000, absoluteMs: 86_400_000 },
    });
    expect(() => loadConfig({ SCRYPT_COST: '3000' })).toThrow('SCRYPT_COST: must be a power of two from 1024 to 1048576');
    expect(() => loadConfig({ SCRYPT_COST: '512' })).toThrow('SCRYPT_COST: must be a power of two from 1024 to 1048576');
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

describe('how long a request may take', () => {
  it('is long enough for the largest upload at 32 KiB/s, at least 5 minutes, unless REQUEST_TIMEOUT_S says', () => {
    // 20 MiB at 32 KiB/s = 640 s; 2 MiB would take 64 s, so the 5-minute floor holds.
    expect(loadConfig({}).requestTimeoutMs).toBe(640_000);
    expect(loadConfig({ MAX_UPLOAD_MB: '2' }).requestTimeoutMs).toBe(300_000);
    expect(loadConfig({ MAX_UPLOAD_MB: '100' }).requestTimeoutMs).toBe(3_200_000);
    expect(loadConfig({ REQUEST_TIMEOUT_S: '1800' }).requestTimeoutMs).toBe(1_800_000);
    expect(() => loadConfig({ REQUEST_TIMEOUT_S: '5' })).toThrow(ConfigError);
    expect(() => loadConfig({ REQUEST_TIMEOUT_S: '90.5' })).toThrow(/REQUEST_TIMEOUT_S/);
  });

  it('is set on the listening server, with headers still due within a minute', async () => {
    const { createServer } = await import('node:http');
    const { applyRequestTimeouts } = await import('../../server/startup');
    const server = createServer();
    // Node's own defaults, which cut a 20 MB upload over a slow link at 5 minutes.
    expect(server.requestTimeout).toBe(300_000);
    applyRequestTimeouts(server, loadConfig({}));
    expect(server.requestTimeout).toBe(640_000);
    expect(server.headersTimeout).toBe(60_000);
    applyRequestTimeouts(server, { requestTimeoutMs: 30_000 });
    expect(server.headersTimeout).toBe(30_000);
  });
});
