import supertest from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { hashPassword } from '../../server/auth/passwords';
import { Session, User } from '../../server/db/models';
import { startApi, TEST_PASSWORD, type TestApi } from './support/api';
import { captureLog } from './support/log-capture';

let api: TestApi;
const log = captureLog();

beforeAll(async () => {
  api = await startApi({ logLevel: 'info', sessionsPerUser: 3 }, { logDestination: log.stream });
});
afterAll(() => api.close());

// User-Agent strings as browsers send them (made up for these tests in the usual shape).
const FIREFOX_ANDROID = 'Mozilla/5.0 (Android 14; Mobile; rv:128.0) Gecko/128.0 Firefox/128.0';
const CHROME_WINDOWS =
  'Mozilla/5.0 (Windows NT 10.0; Win64; x64) AppleWebKit/537.36 (KHTML, like Gecko) Chrome/126.0.0.0 Safari/537.36';
const SAFARI_IPHONE =
  'Mozilla/5.0 (iPhone; CPU iPhone OS 17_5 like Mac OS X) AppleWebKit/605.1.15 (KHTML, like Gecko) Version/17.5 Mobile/15E148 Safari/604.1';
const FIREFOX_LINUX = 'Mozilla/5.0 (X11; Linux x86_64; rv:128.0) Gecko/20100101 Firefox/128.0';

/** A browser signed in as `email` with the given User-Agent; its CSRF token is the one sign-in returned. */
async function browser(email: string, userAgent: string) {
  const agent = supertest.agent(api.app.app);
  agent.set('user-agent', userAgent);
  const first = (await agent.get('/api/auth/csrf').expect(200)).body.csrfToken as string;
  const res = await agent.post('/api/auth/login').set('x-csrf-token', first).send({ email, password: TEST_PASSWORD }).expect(200);
  return { agent, csrf: res.body.csrfToken as string };
}

describe('sessions per account', () => {
  it('keeps the newest 3: a fourth sign-in ends the oldest, and its holder is signed out', async () => {
    const email = 'planner.test@example.com';
    const phone = await browser(email, FIREFOX_ANDROID);
    const desk = await browser(email, CHROME_WINDOWS);
    const tablet = await browser(email, SAFARI_IPHONE);
    expect(await Session.count({ where: { userId: api.users.planner.id } })).toBe(3);

    const laptop = await browser(email, FIREFOX_LINUX);
    expect(await Session.count({ where: { userId: api.users.planner.id } })).toBe(3);
    expect((await phone.agent.get('/api/auth/me').expect(401)).body.error.code).toBe('unauthenticated');
    for (const b of [desk, tablet, laptop]) expect((await b.agent.get('/api/auth/me').expect(200)).body.email).toBe(email);
    expect(log.security('sessions-ended-over-cap')).toEqual([
      expect.objectContaining({ userId: api.users.planner.id, ended: 1, cap: 3 }),
    ]);

    // Another account's sessions are not touched by the planner's sign-ins.
    const other = await browser('supervisor.test@example.com', CHROME_WINDOWS);
    await other.agent.get('/api/auth/me').expect(200);
    expect(await Session.count({ where: { userId: api.users.supervisor.id } })).toBe(1);
  });

  it('lists the account’s own sessions, newest first, with device and address, and never a session id', async () => {
    const email = 'technician.test@example.com';
    const phone = await browser(email, FIREFOX_ANDROID);
    const desk = await browser(email, CHROME_WINDOWS);
    const res = await desk.agent.get('/api/auth/sessions').expect(200);
    expect(res.body.cap).toBe(3);
    expect(res.body.sessions.map((s: { device: string; current: boolean }) => [s.device, s.current])).toEqual([
      ['Chrome on Windows', true],
      ['Firefox on Android', false],
    ]);
    expect(res.body.sessions[0].address).toMatch(/127\.0\.0\.1/);
    expect(Date.parse(res.body.sessions[0].signedInAt)).toBeGreaterThanOrEqual(Date.parse(res.body.sessions[1].signedInAt));
    const sids = (await Session.findAll({ where: { userId: api.users.technician.id } })).map((s) => s.sid);
    expect(sids).toHaveLength(2);
    for (const sid of sids) expect(JSON.stringify(res.body)).not.toContain(sid);
    // The other browser sees the same two, itself marked as the current one.
    const seen = (await phone.agent.get('/api/auth/sessions').expect(200)).body.sessions;
    expect(seen.map((s: { device: string; current: boolean }) => [s.device, s.current])).toEqual([
      ['Chrome on Windows', false],
      ['Firefox on Android', true],
    ]);
  });

  it('lets the owner end another of their sessions, not the one in use, and not someone else’s', async () => {
    const email = 'admin.test@example.com';
    const phone = await browser(email, FIREFOX_ANDROID);
    const desk = await browser(email, CHROME_WINDOWS);
    const listed = (await desk.agent.get('/api/auth/sessions').expect(200)).body.sessions as { id: string; current: boolean }[];
    const phoneId = listed.find((s) => !s.current)!.id;
    const deskId = listed.find((s) => s.current)!.id;

    // Someone else's session cannot be ended by its handle.
    const stranger = await browser('supervisor.test@example.com', SAFARI_IPHONE);
    const refused = await stranger.agent.delete(`/api/auth/sessions/${phoneId}`).set('x-csrf-token', stranger.csrf).expect(404);
    expect(refused.body.error).toEqual({ code: 'not_found', message: 'That session has already ended.' });
    await phone.agent.get('/api/auth/me').expect(200);

    const own = await desk.agent.delete(`/api/auth/sessions/${deskId}`).set('x-csrf-token', desk.csrf).expect(409);
    expect(own.body.error.code).toBe('current_session');

    await desk.agent.delete(`/api/auth/sessions/${phoneId}`).set('x-csrf-token', desk.csrf).expect(200);
    await phone.agent.get('/api/auth/me').expect(401);
    await desk.agent.get('/api/auth/me').expect(200);
    const left = (await desk.agent.get('/api/auth/sessions').expect(200)).body.sessions;
    expect(left.map((s: { id: string }) => s.id)).toEqual([deskId]);
    await desk.agent.delete(`/api/auth/sessions/${phoneId}`).set('x-csrf-token', desk.csrf).expect(404);
    expect(log.security('session-ended-by-owner')).toEqual([expect.objectContaining({ userId: api.users.admin.id })]);
  });

  it('gives a session that has already ended no place under the cap: a live one is not ended to keep it', async () => {
    const email = 'cap.ended@example.com';
    const user = await User.create({ email, name: 'Cai Capped', role: 'technician', passwordHash: await hashPassword(TEST_PASSWORD) });
    const phone = await browser(email, FIREFOX_ANDROID);
    const desk = await browser(email, CHROME_WINDOWS);
    const tablet = await browser(email, SAFARI_IPHONE);
    // The tablet, the newest sign-in, was then left unused until its idle time ran out: its row stays until the store
    // sweeps it or the tablet is next used, but the session has ended (its idle end and last use are in the past).
    const rows = await Session.findAll({ where: { userId: user.id } });
    const tabletRow = rows.find((r) => JSON.parse(r.data).device === 'Safari on iPhone')!;
    const idleMs = api.app.ctx.config.session.idleMs;
    const lastSeenAt = Date.now() - idleMs - 60_000;
    await tabletRow.update({ expires: new Date(lastSeenAt + idleMs), data: JSON.stringify({ ...JSON.parse(tabletRow.data), lastSeenAt }) });

    // A fourth sign-in: the account has three sessions in force (phone, desk and the new laptop), within the cap of 3.
    const laptop = await browser(email, FIREFOX_LINUX);
    for (const b of [phone, desk, laptop]) expect((await b.agent.get('/api/auth/me').expect(200)).body.email).toBe(email);
    const listed = (await laptop.agent.get('/api/auth/sessions').expect(200)).body.sessions;
    expect(listed.map((s: { device: string }) => s.device)).toEqual(['Firefox on Linux', 'Chrome on Windows', 'Firefox on Android']);
    expect(log.security('sessions-ended-over-cap').filter((e) => e.userId === user.id)).toEqual([]);
    await tablet.agent.get('/api/auth/me').expect(401);

    // A fifth ends the oldest in force, the phone.
    await browser(email, CHROME_WINDOWS);
    await phone.agent.get('/api/auth/me').expect(401);
    for (const b of [desk, laptop]) await b.agent.get('/api/auth/me').expect(200);
    expect(log.security('sessions-ended-over-cap').filter((e) => e.userId === user.id)).toEqual([expect.objectContaining({ ended: 1, cap: 3 })]);
  });
});
