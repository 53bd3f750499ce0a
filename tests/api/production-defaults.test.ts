import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { verifyPassword } from '../../server/auth/passwords';
import { dialectOf, sqlitePath } from '../../server/db/connection';
import { User } from '../../server/db/models';
import { adminCreate, Refusal } from '../../scripts/admin-create';
import { createApp } from '../../server/app';
import { freshDatabase, testConfig } from '../support/test-config';
import { startApi, type TestApi } from './support/api';

/** Makes the next API call fail inside the server: its table is gone. */
async function breakOutbox(api: TestApi) {
  await api.app.ctx.sequelize.query('DROP TABLE outbox_messages');
}

describe('outside development', () => {
  let api: TestApi;
  beforeAll(async () => {
    api = await startApi({ env: 'production', client: 'none', trustProxyHops: 1 });
  });
  afterAll(() => api.close());

  it('answers a server error without a stack trace or a file path', async () => {
    const admin = await api.as('admin');
    await breakOutbox(api);
    const res = await admin.get('/api/outbox').expect(500);
    expect(res.body).toEqual({ error: { code: 'internal', message: 'Something went wrong on the server.' } });
    expect(res.text).not.toContain(process.cwd());
    expect(res.text).not.toMatch(/\bat \w/);
  });

  it('sends a content security policy and no-store on API answers', async () => {
    const res = await (await api.anonymous()).get('/api/health').expect(200);
    expect(res.headers['content-security-policy']).toContain("default-src 'self'");
    expect(res.headers['content-security-policy']).toContain("script-src 'self'");
    expect(res.headers['cache-control']).toBe('no-store');
    const me = await (await api.as('planner')).get('/api/auth/me').expect(200);
    expect(me.headers['cache-control']).toBe('no-store');
  });

  it('sends Strict-Transport-Security only over HTTPS', async () => {
    const c = await api.anonymous();
    const plain = await c.get('/api/health').expect(200);
    expect(plain.headers['strict-transport-security']).toBeUndefined();
    // Behind the one trusted proxy, which says the visitor came over HTTPS.
    const secure = await c.agent.get('/api/health').set('x-forwarded-proto', 'https').expect(200);
    expect(secure.headers['strict-transport-security']).toBe('max-age=31536000; includeSubDomains');
  });

  it('keeps the database and upload folders closed to other users', () => {
    const { config } = api.app.ctx;
    expect(fs.statSync(config.uploadDir).mode & 0o007).toBe(0);
    if (dialectOf(config.databaseUrl) === 'sqlite') {
      const file = sqlitePath(config.databaseUrl);
      expect(fs.statSync(file).mode & 0o777).toBe(0o600);
      expect(fs.statSync(path.dirname(file)).mode & 0o007).toBe(0);
    }
  });
});

describe('in development (NODE_ENV=development)', () => {
  let api: TestApi;
  beforeAll(async () => {
    api = await startApi({ env: 'development', client: 'none' });
  });
  afterAll(() => api.close());

  it('shows the developer what went wrong', async () => {
    const admin = await api.as('admin');
    await breakOutbox(api);
    const res = await admin.get('/api/outbox').expect(500);
    expect(res.body.error.code).toBe('internal');
    // The stack trace, with the server's own frames.
    expect(res.body.error.message).toMatch(/\n\s+at /);
  });
});

describe('npm run admin:create', () => {
  const db = freshDatabase();
  afterAll(async () => (await db).cleanup());

  /** The command as `npm run admin:create -- …args` runs it, with `input` on standard input. */
  async function run(args: string[], input: string) {
    const { url, dir } = await db;
    const env = { DATABASE_URL: url, UPLOAD_DIR: path.join(dir, 'uploads'), SCRYPT_COST: '1024', LOG_LEVEL: 'silent', DEMO_DATA: 'off' };
    return adminCreate(args, async () => input.replace(/\r?\n$/, ''), env).then(
      (line) => ({ status: 0, line }),
      (err: unknown) => {
        if (!(err instanceof Refusal)) throw err;
        return { status: err.exitCode, line: err.message };
      },
    );
  }

  it('creates an active administrator with the password from standard input, on an empty database', async () => {
    const res = await run(['--email', 'First.Admin@example.com', '--name', 'Ffion Admin'], 'quarry-lantern-orbit-41\n');
    expect(res.status).toBe(0);
    expect(res.line).toMatch(/^Created administrator Ffion Admin <first\.admin@example\.com> \(user \d+\)\.$/);
    const { url, dir } = await db;
    const app = await createApp(testConfig(url, dir));
    try {
      const user = (await User.findOne({ where: { email: 'first.admin@example.com' } }))!;
      expect(user).toMatchObject({ role: 'admin', active: true, mustChangePassword: false, name: 'Ffion Admin' });
      expect(await verifyPassword('quarry-lantern-orbit-41', user.passwordHash)).toBe(true);
    } finally {
      await app.close();
    }
  });

  it('refuses a weak password, a taken address and missing options with one line', async () => {
    const weak = await run(['--email', 'second@example.com', '--name', 'Second Admin'], 'aaaaaaaaaa');
    expect(weak.status).toBe(1);
    expect(weak.line).toMatch(/^admin:create: the password is too easy to guess \(strength 0 of 4, needs 3\)[^\n]*$/);
    const taken = await run(['--email', 'first.admin@example.com', '--name', 'Again'], 'quarry-lantern-orbit-42');
    expect(taken).toEqual({ status: 1, line: 'admin:create: a user with e-mail first.admin@example.com already exists' });
    const missing = await run(['--name', 'Nobody'], 'quarry-lantern-orbit-43');
    expect(missing).toEqual({ status: 2, line: 'admin:create: --email is required' });
    const ownName = await run(['--email', 'third@example.com', '--name', 'Gwendolyn Marsh'], 'gwendolyn-orbit-41');
    expect(ownName).toEqual({ status: 1, line: 'admin:create: the password must not contain your name' });
    const empty = await run(['--email', 'fourth@example.com', '--name', 'Fourth'], '\n');
    expect(empty).toEqual({ status: 2, line: 'admin:create: no password on standard input' });
  });
});
