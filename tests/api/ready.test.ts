import fs from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startApi, type TestApi } from './support/api';
import { captureLog } from './support/log-capture';

describe('GET /api/health and /api/ready', () => {
  let api: TestApi;
  const logs = captureLog();
  beforeAll(async () => {
    api = await startApi({ logLevel: 'info' }, { logDestination: logs.stream });
  });
  afterAll(() => api?.close());

  it('says alive, and ready once the database, migrations, store and queue all answer', async () => {
    const c = await api.anonymous();
    expect((await c.get('/api/health').expect(200)).body).toEqual({ status: 'ok' });
    const ready = await c.get('/api/ready').expect(200);
    expect(ready.body).toEqual({ status: 'ready', checks: { database: 'ok', migrations: 'ok', storage: 'ok', jobs: 'ok', shutdown: 'ok' } });
  });

  it('is not ready when the raw trace store cannot be reached, and says which check failed', async () => {
    const dir = api.app.ctx.config.uploadDir;
    fs.renameSync(dir, `${dir}.away`);
    try {
      const res = await (await api.anonymous()).get('/api/ready').expect(503);
      expect(res.body.status).toBe('not-ready');
      expect(res.body.checks.storage).toMatch(/ENOENT/);
      expect(res.body.checks.database).toBe('ok');
      expect(res.body.checks.migrations).toBe('ok');
    } finally {
      fs.renameSync(`${dir}.away`, dir);
    }
    await (await api.anonymous()).get('/api/ready').expect(200);
  });

  it('carries a request id on the answer and on every log line of the request', async () => {
    const c = await api.anonymous();
    const own = await c.get('/api/no-such-thing').set('x-request-id', 'proxy-7f3a-0001').expect(404);
    expect(own.headers['x-request-id']).toBe('proxy-7f3a-0001');
    const made = await c.get('/api/health').expect(200);
    expect(made.headers['x-request-id']).toMatch(/^[0-9a-f-]{36}$/);
    // An id that does not look like one is replaced, not written into the log.
    const odd = await c.get('/api/health').set('x-request-id', 'a b {c}').expect(200);
    expect(odd.headers['x-request-id']).toMatch(/^[0-9a-f-]{36}$/);

    const planner = await api.as('planner');
    await planner.post('/api/auth/password', { currentPassword: 'not-the-password', newPassword: 'Another long passphrase 42' }).set('x-request-id', 'proxy-7f3a-0002');
    const lines = logs.lines.filter((l) => l.requestId === 'proxy-7f3a-0002');
    expect(lines.map((l) => l.security)).toContain('password-change-failed');
  });

  it('turns not ready as soon as the instance begins to shut down', async () => {
    api.app.beginShutdown();
    const res = await (await api.anonymous()).get('/api/ready').expect(503);
    expect(res.body.checks.shutdown).toBe('this instance is shutting down');
    expect(res.body.checks.database).toBe('ok');
  });
});
