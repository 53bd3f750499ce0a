import supertest from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Session } from '../../server/db/models';
import { startApi, TEST_PASSWORD, type TestApi } from './support/api';
import { captureLog } from './support/log-capture';

let api: TestApi;
const log = captureLog();
const HOUR = 3_600_000;
const DAY = 24 * HOUR;

beforeAll(async () => {
  // The defaults: 12 hours idle, 7 days in all.
  api = await startApi({ logLevel: 'info', session: { idleMs: 12 * HOUR, absoluteMs: 7 * DAY } }, { logDestination: log.stream });
});
afterAll(() => api.close());

/** Sign in with a bare agent and return it with the session id (the cookie is "s:<sid>.<signature>"). */
async function signedIn(email = 'planner.test@example.com') {
  const agent = supertest.agent(api.app.app);
  const csrf = (await agent.get('/api/auth/csrf').expect(200)).body.csrfToken;
  const res = await agent.post('/api/auth/login').set('x-csrf-token', csrf).send({ email, password: TEST_PASSWORD }).expect(200);
  const cookie = decodeURIComponent(/rholog\.sid=([^;]+)/.exec(String(res.headers['set-cookie']))![1]);
  const sid = cookie.slice(2, cookie.lastIndexOf('.'));
  return { agent, sid };
}

async function sessionData(sid: string) {
  const row = await Session.findByPk(sid);
  return row ? { data: JSON.parse(row.data) as Record<string, unknown> & { signedInAt: number; lastSeenAt: number }, expires: row.expires } : null;
}

/** Move a session's clocks back, as if time had passed. */
async function age(sid: string, change: { signedInAgoMs?: number; lastSeenAgoMs?: number }) {
  const { data } = (await sessionData(sid))!;
  if (change.signedInAgoMs !== undefined) data.signedInAt = Date.now() - change.signedInAgoMs;
  if (change.lastSeenAgoMs !== undefined) data.lastSeenAt = Date.now() - change.lastSeenAgoMs;
  await Session.update({ data: JSON.stringify(data) }, { where: { sid } });
}

describe('session lifetime', () => {
  it('records when the person signed in and was last seen', async () => {
    const before = Date.now();
    const { sid } = await signedIn();
    const { data } = (await sessionData(sid))!;
    expect(data.signedInAt).toBeGreaterThanOrEqual(before);
    expect(data.lastSeenAt).toBe(data.signedInAt);
  });

  it('ends a session 7 days after sign-in however busy it is, and removes its row', async () => {
    const { agent, sid } = await signedIn();
    await age(sid, { signedInAgoMs: 7 * DAY + 60_000, lastSeenAgoMs: 10_000 });
    const res = await agent.get('/api/auth/me').expect(401);
    expect(res.body.error.code).toBe('unauthenticated');
    expect(await Session.findByPk(sid)).toBeNull();
    expect(log.security('session-expired').at(-1)).toMatchObject({ userId: api.users.planner.id, reason: 'absolute lifetime' });
  });

  it('keeps a session of 6 days that is in use', async () => {
    const { agent, sid } = await signedIn();
    await age(sid, { signedInAgoMs: 6 * DAY, lastSeenAgoMs: HOUR });
    await agent.get('/api/auth/me').expect(200);
  });

  it('ends a session left idle for more than 12 hours', async () => {
    const { agent, sid } = await signedIn();
    await age(sid, { lastSeenAgoMs: 12 * HOUR + 60_000 });
    await agent.get('/api/auth/me').expect(401);
    expect(await Session.findByPk(sid)).toBeNull();
    expect(log.security('session-expired').at(-1)).toMatchObject({ reason: 'idle' });
  });
});

describe('session writes', () => {
  it('does not write the session row on every request', async () => {
    const { agent, sid } = await signedIn();
    const first = await sessionData(sid);
    for (let i = 0; i < 5; i++) {
      const res = await agent.get('/api/auth/me').expect(200);
      expect(String(res.headers['set-cookie'] ?? '')).not.toContain('rholog.sid=');
    }
    expect(await sessionData(sid)).toEqual(first);
  });

  it('moves the idle clock on, renewing row and cookie, once a minute has passed', async () => {
    const { agent, sid } = await signedIn();
    await age(sid, { lastSeenAgoMs: 90_000 });
    const stale = await sessionData(sid);
    const before = Date.now();
    const res = await agent.get('/api/auth/me').expect(200);
    expect(String(res.headers['set-cookie'])).toContain('rholog.sid=');
    const fresh = (await sessionData(sid))!;
    expect(fresh.data.lastSeenAt).toBeGreaterThanOrEqual(before);
    expect(fresh.data.signedInAt).toBe(stale!.data.signedInAt);
    expect(new Date(fresh.expires!).getTime()).toBeGreaterThan(new Date(stale!.expires!).getTime());
  });
});

describe('signed-out visitors', () => {
  it('leave no session row, however many pages they load', async () => {
    const before = await Session.count();
    const visitor = supertest.agent(api.app.app);
    for (let i = 0; i < 10; i++) {
      await visitor.get('/api/auth/csrf').expect(200);
      await visitor.get('/api/auth/me').expect(401);
      await visitor.get('/api/health').expect(200);
    }
    expect(await Session.count()).toBe(before);
  });
});
