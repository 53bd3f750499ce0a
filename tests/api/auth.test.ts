import { gzipSync } from 'node:zlib';
import supertest from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Session } from '../../server/db/models';
import { startApi, TEST_PASSWORD, type TestApi } from './support/api';

let api: TestApi;
// No slow-down in this file (slowAfter far above any count here); the limits have their own tests.
const LIMITS = { maxPerPair: 3, maxPerAddress: 20, windowMs: 60_000, slowAfter: 1000, delayMs: 0, maxDelayMs: 0 };
beforeAll(async () => {
  api = await startApi({ login: LIMITS });
});
afterAll(() => api.close());

describe('the database', () => {
  it('is the one the environment names (PostgreSQL in the CI second pass, else a SQLite file)', () => {
    const expected = /^postgres/.test(process.env.DATABASE_URL ?? '') ? 'postgres' : 'sqlite';
    expect(api.app.ctx.sequelize.getDialect()).toBe(expected);
  });
});

describe('GET /api/health', () => {
  it('answers ok', async () => {
    const c = await api.anonymous();
    const res = await c.get('/api/health').expect(200);
    expect(res.body).toEqual({ status: 'ok' });
  });
});

describe('GET /api/auth/csrf', () => {
  it('stores no session for a signed-out visitor (the token travels in a signed cookie)', async () => {
    const before = await Session.count();
    for (let i = 0; i < 25; i++) {
      const res = await supertest(api.app.app).get('/api/auth/csrf').expect(200);
      expect(res.body.csrfToken).toMatch(/^[0-9a-f]{64}\.[0-9a-f]{64}$/);
      expect(String(res.headers['set-cookie'])).not.toContain('rholog.sid=');
      expect(String(res.headers['set-cookie'])).toMatch(/rholog\.csrf=[^;]+; Path=\/; HttpOnly; SameSite=Lax/);
    }
    expect(await Session.count()).toBe(before);
  });

  it('refuses a token whose cookie is missing or belongs to another visitor', async () => {
    const a = await api.anonymous();
    const b = await api.anonymous();
    const mixed = await a.agent.post('/api/auth/login').set('x-csrf-token', b.csrf).send({ email: 'admin.test@example.com', password: TEST_PASSWORD }).expect(403);
    expect(mixed.body.error.code).toBe('csrf_invalid');
    const bare = await supertest(api.app.app).post('/api/auth/login').set('x-csrf-token', a.csrf).send({ email: 'admin.test@example.com', password: TEST_PASSWORD }).expect(403);
    expect(bare.body.error.code).toBe('csrf_invalid');
  });

  it('binds the token to the session from sign-in on: the signed-out token no longer works', async () => {
    const c = await api.anonymous();
    const signedOutToken = c.csrf;
    const login = await c.post('/api/auth/login', { email: 'planner.test@example.com', password: TEST_PASSWORD }).expect(200);
    expect(login.body.csrfToken).not.toBe(signedOutToken);
    const stale = await c.agent.patch('/api/auth/me').set('x-csrf-token', signedOutToken).send({ unitPreference: 'ft' }).expect(403);
    expect(stale.body.error.code).toBe('csrf_invalid');
    const ok = await c.agent.patch('/api/auth/me').set('x-csrf-token', login.body.csrfToken).send({ unitPreference: 'ft' }).expect(200);
    expect(ok.body.unitPreference).toBe('ft');
  });
});

describe('POST /api/auth/login', () => {
  it('signs in with the right password and returns the user', async () => {
    const c = await api.anonymous();
    const res = await c.post('/api/auth/login', { email: 'PLANNER.test@example.com ', password: TEST_PASSWORD }).expect(200);
    expect(res.body.user).toMatchObject({ email: 'planner.test@example.com', role: 'planner', name: 'Pat Plan' });
    // HMAC (hex SHA-256) and the random value it signs, joined by a dot.
    expect(res.body.csrfToken).toMatch(/^[0-9a-f]{64}\.[0-9a-f]{64}$/);
    const cookie = String(res.headers['set-cookie']);
    expect(cookie).toContain('HttpOnly');
    expect(cookie).toContain('SameSite=Lax');
  });

  it('gives a new session id at sign-in, whatever session id the browser brought (no session fixation)', async () => {
    const cookieOf = (res: supertest.Response, name: string) =>
      new RegExp(`${name.replace('.', '\\.')}=([^;]+)`).exec(String(res.headers['set-cookie']))?.[1];
    // Someone signs in as themself, then plants that session cookie in another person's browser.
    const planter = supertest.agent(api.app.app);
    const t = (await planter.get('/api/auth/csrf').expect(200)).body.csrfToken;
    const planted = cookieOf(
      await planter.post('/api/auth/login').set('x-csrf-token', t).send({ email: 'planner.test@example.com', password: TEST_PASSWORD }).expect(200),
      'rholog.sid',
    );
    expect(planted).toBeTruthy();
    const victim = await supertest(api.app.app).get('/api/auth/csrf').set('cookie', `rholog.sid=${planted}`).expect(200);
    const res = await supertest(api.app.app)
      .post('/api/auth/login')
      .set('cookie', `rholog.sid=${planted}; rholog.csrf=${cookieOf(victim, 'rholog.csrf')}`)
      .set('x-csrf-token', victim.body.csrfToken)
      .send({ email: 'admin.test@example.com', password: TEST_PASSWORD })
      .expect(200);
    const after = cookieOf(res, 'rholog.sid');
    expect(after).toBeTruthy();
    expect(after).not.toEqual(planted);
    // The planted session is still the planner's, never the administrator's.
    const me = await supertest(api.app.app).get('/api/auth/me').set('cookie', `rholog.sid=${planted}`);
    expect(me.body.email).not.toBe('admin.test@example.com');
  });

  it('rejects a wrong password with 401 and a clear message', async () => {
    const c = await api.anonymous();
    const res = await c.post('/api/auth/login', { email: 'supervisor.test@example.com', password: 'nope' }).expect(401);
    expect(res.body.error).toEqual({ code: 'wrong_credentials', message: 'The e-mail address or password is not right.' });
    // A password longer than any Rholog accepts is refused for its length, not called missing.
    const long = await c.post('/api/auth/login', { email: 'supervisor.test@example.com', password: 'x'.repeat(200_000) }).expect(400);
    expect(long.body.error.fields).toEqual([{ field: 'password', message: 'must be at most 200 characters (no Rholog password is longer)' }]);
  });

  it('gives the same answer for an unknown e-mail (no account probing)', async () => {
    const c = await api.anonymous();
    const res = await c.post('/api/auth/login', { email: 'nobody@example.com', password: 'x' }).expect(401);
    expect(res.body.error.message).toBe('The e-mail address or password is not right.');
  });

  it('names the bad field when the body is incomplete', async () => {
    const c = await api.anonymous();
    const res = await c.post('/api/auth/login', { email: 'not-an-address' }).expect(400);
    expect(res.body.error.code).toBe('invalid_input');
    expect(res.body.error.fields).toEqual(
      expect.arrayContaining([
        { field: 'email', message: 'must be an e-mail address' },
        { field: 'password', message: 'is required' },
      ]),
    );
  });

  it('refuses a request without the CSRF token', async () => {
    const c = await api.anonymous();
    const res = await c.agent.post('/api/auth/login').send({ email: 'admin.test@example.com', password: TEST_PASSWORD }).expect(403);
    expect(res.body.error.code).toBe('csrf_invalid');
  });

  it('refuses further tries on one account from one address after repeated failures (limit 3 in this test)', async () => {
    const c = await api.anonymous();
    for (let i = 0; i < 3; i++) await c.post('/api/auth/login', { email: 'technician.test@example.com', password: `bad-${i}` }).expect(401);
    const res = await c.post('/api/auth/login', { email: 'technician.test@example.com', password: TEST_PASSWORD }).expect(429);
    expect(res.body.error.code).toBe('too_many_attempts');
    expect(res.body.error.message).toMatch(/Too many failed sign-ins for this account/);
  });

  it('does not count successful sign-ins against the address (a crew shares one depot address)', async () => {
    const c = await api.anonymous();
    // The address limit in this file is 20 failed tries; 25 good sign-ins in a row must all pass.
    // (scrypt runs at the test configuration's low cost, so this takes milliseconds, not the machine's patience.)
    for (let i = 0; i < 25; i++) {
      const res = await c.post('/api/auth/login', { email: 'planner.test@example.com', password: TEST_PASSWORD });
      expect(res.status).toBe(200);
      c.csrf = res.body.csrfToken;
    }
  });

  it('answers malformed JSON with 400, not 500', async () => {
    const c = await api.anonymous();
    const res = await c.agent.post('/api/auth/login').set('x-csrf-token', c.csrf).set('content-type', 'application/json').send('{"email":').expect(400);
    expect(res.body.error.code).toBe('invalid_json');
  });

  it('says so when a body is sent in a type it does not read, and lets a body-less request through', async () => {
    const c = await api.anonymous();
    const res = await c.agent
      .post('/api/auth/login')
      .set('x-csrf-token', c.csrf)
      .set('content-type', 'text/plain')
      .send(JSON.stringify({ email: 'planner.test@example.com', password: TEST_PASSWORD }))
      .expect(415);
    expect(res.body.error).toEqual({
      code: 'body_type_unsupported',
      message:
        'The request body is sent as "text/plain", which the server does not read: send JSON with Content-Type: application/json (a file upload as multipart/form-data). Nothing was stored.',
      fields: [{ field: 'Content-Type', message: 'must be application/json, or multipart/form-data for a file upload' }],
    });
    // No body at all: the route answers for itself (here, the missing fields).
    const empty = await c.agent.post('/api/auth/login').set('x-csrf-token', c.csrf).expect(400);
    expect(empty.body.error.code).not.toBe('body_type_unsupported');
  });

  it('says what is wrong with a compressed body that does not decompress, or an encoding it does not read', async () => {
    const c = await api.anonymous();
    const send = (encoding: string, body: Buffer) =>
      c.agent
        .post('/api/auth/login')
        .set('x-csrf-token', c.csrf)
        .set('content-type', 'application/json')
        .set('content-encoding', encoding)
        .serialize((b: unknown) => b as string)
        .send(body as unknown as string);
    const notGzip = await send('gzip', Buffer.from('{"email": "a@example.com"}')).expect(400);
    expect(notGzip.body.error).toEqual({
      code: 'body_not_decompressed',
      message: 'The request body says it is compressed (Content-Encoding: gzip) but it could not be decompressed (incorrect header check). Send it uncompressed, or compressed whole.',
    });
    const cut = await send('gzip', gzipSync(Buffer.from('{"email": "a@example.com", "password": "x"}')).subarray(0, 20)).expect(400);
    expect(cut.body.error.message).toContain('(unexpected end of file)');
    const unknown = await send('compress', Buffer.from('{}')).expect(415);
    expect(unknown.body.error).toEqual({
      code: 'body_encoding_unsupported',
      message: 'The request body\'s Content-Encoding "compress" is not one the server reads: send it uncompressed, or as gzip, deflate or br.',
    });
    // A whole gzip body is read as usual: the wrong password is the only complaint.
    const whole = await send('gzip', gzipSync(Buffer.from(JSON.stringify({ email: 'planner.test@example.com', password: 'not-the-password' })))).expect(401);
    expect(whole.body.error.code).not.toBe('body_not_decompressed');
  });
});

describe('GET /api/auth/demo', () => {
  it('lists no accounts when the server runs without its demo data', async () => {
    const c = await api.anonymous();
    const res = await c.get('/api/auth/demo').expect(200);
    expect(res.body).toEqual({ demo: false });
  });
});

describe('GET /api/auth/me', () => {
  it('answers 401 without a session', async () => {
    const c = await api.anonymous();
    const res = await c.get('/api/auth/me').expect(401);
    expect(res.body.error.code).toBe('unauthenticated');
  });

  it('returns id, e-mail, name and role for the signed-in user', async () => {
    const c = await api.as('supervisor');
    const res = await c.get('/api/auth/me').expect(200);
    expect(res.body).toMatchObject({ id: api.users.supervisor.id, email: 'supervisor.test@example.com', name: 'Sol Super', role: 'supervisor' });
  });

  it('keeps sessions in the database', async () => {
    const c = await api.as('planner');
    await c.get('/api/auth/me').expect(200);
    const rows = await Session.findAll({ where: { userId: api.users.planner.id } });
    expect(rows.length).toBeGreaterThan(0);
  });
});

describe('POST /api/auth/logout', () => {
  it('ends the session and leaves no session row', async () => {
    const c = await api.as('planner');
    const before = await Session.count({ where: { userId: api.users.planner.id } });
    const res = await c.post('/api/auth/logout').expect(200);
    c.csrf = res.body.csrfToken;
    await c.get('/api/auth/me').expect(401);
    expect(await Session.count({ where: { userId: api.users.planner.id } })).toBe(before - 1);
    // The new token is a signed-out one: it opens the sign-in form again.
    await c.post('/api/auth/login', { email: 'planner.test@example.com', password: TEST_PASSWORD }).expect(200);
  });
});

describe('POST /api/auth/password', () => {
  it('refuses a short new password and names the field', async () => {
    const c = await api.as('admin');
    const res = await c.post('/api/auth/password', { currentPassword: TEST_PASSWORD, newPassword: 'short' }).expect(400);
    expect(res.body.error.fields).toEqual([{ field: 'newPassword', message: 'must be at least 10 characters' }]);
  });
});

describe('unknown API routes', () => {
  it('answer 404 in JSON', async () => {
    const c = await api.anonymous();
    const res = await c.get('/api/no-such-thing').expect(404);
    expect(res.body.error).toEqual({ code: 'no_such_route', message: 'There is no API route GET /api/no-such-thing.' });
  });
});
