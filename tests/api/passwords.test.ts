import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { verifyPassword } from '../../server/auth/passwords';
import { Session, User } from '../../server/db/models';
import { startApi, type TestApi } from './support/api';
import { captureLog } from './support/log-capture';

let api: TestApi;
const log = captureLog();
// A strong new password (zxcvbn score 4) that has nothing of any test user's name or address in it.
const STRONG = 'kettle-orbit-ninety-seven';

beforeAll(async () => {
  api = await startApi({ logLevel: 'info', passwordChangeMaxFails: 3 }, { logDestination: log.stream });
});
afterAll(() => api.close());

async function person(email: string, name: string) {
  const admin = await api.as('admin');
  const created = await admin.post('/api/users', { email, name, role: 'technician' }).expect(201);
  const client = await api.signIn(email, created.body.temporaryPassword);
  return { id: created.body.user.id as number, client, temporary: created.body.temporaryPassword as string };
}

describe('POST /api/auth/password: strength', () => {
  it('refuses a repeated character, naming the field and the reason, and keeps the old password', async () => {
    const p = await person('rita.weak@example.com', 'Rita Weak');
    const before = (await User.findByPk(p.id))!.passwordHash;
    const res = await p.client.post('/api/auth/password', { currentPassword: p.temporary, newPassword: 'aaaaaaaaaa' }).expect(400);
    expect(res.body.error.code).toBe('weak_password');
    expect(res.body.error.fields).toHaveLength(1);
    expect(res.body.error.fields[0].field).toBe('newPassword');
    expect(res.body.error.fields[0].message).toMatch(/^is too easy to guess \(strength 0 of 4, needs 3\): Repeated characters like "aaa" are easy to guess/);
    expect((await User.findByPk(p.id))!.passwordHash).toBe(before);
  });

  it('refuses a common password', async () => {
    const p = await person('otto.common@example.com', 'Otto Common');
    const res = await p.client.post('/api/auth/password', { currentPassword: p.temporary, newPassword: 'password123' }).expect(400);
    expect(res.body.error.fields[0].message).toMatch(/^is too easy to guess \(strength [0-2] of 4, needs 3\)/);
  });

  it('refuses a password that contains the e-mail address or its local part', async () => {
    const p = await person('quill.harbour@example.com', 'Nell Quill');
    const whole = await p.client.post('/api/auth/password', { currentPassword: p.temporary, newPassword: 'x-quill.harbour@example.com-7' }).expect(400);
    expect(whole.body.error.fields).toEqual([{ field: 'newPassword', message: 'must not contain your e-mail address' }]);
    const local = await p.client.post('/api/auth/password', { currentPassword: p.temporary, newPassword: 'Quill.Harbour-lantern-92' }).expect(400);
    expect(local.body.error.message).toBe('The new password must not contain your e-mail address');
  });

  it('refuses a password that contains the name', async () => {
    const p = await person('crew.member7@example.com', 'Morwenna Tallis');
    const res = await p.client.post('/api/auth/password', { currentPassword: p.temporary, newPassword: 'lantern-TALLIS-orbit' }).expect(400);
    expect(res.body.error.fields).toEqual([{ field: 'newPassword', message: 'must not contain your name' }]);
  });

  it('refuses the current password as the new one', async () => {
    const p = await person('same.again@example.com', 'Sam Again');
    const res = await p.client.post('/api/auth/password', { currentPassword: p.temporary, newPassword: p.temporary }).expect(400);
    expect(res.body.error.code).toBe('same_password');
  });
});

describe('POST /api/auth/password: sessions', () => {
  it('ends every other session of the account and keeps this one', async () => {
    const p = await person('two.phones@example.com', 'Tova Phones');
    const other = await api.signIn('two.phones@example.com', p.temporary);
    const third = await api.signIn('two.phones@example.com', p.temporary);
    expect(await Session.count({ where: { userId: p.id } })).toBe(3);
    await p.client.post('/api/auth/password', { currentPassword: p.temporary, newPassword: STRONG }).expect(200);
    await p.client.get('/api/auth/me').expect(200);
    await other.get('/api/auth/me').expect(401);
    await third.get('/api/auth/me').expect(401);
    expect(await Session.count({ where: { userId: p.id } })).toBe(1);
    const user = (await User.findByPk(p.id))!;
    expect(await verifyPassword(STRONG, user.passwordHash)).toBe(true);
    expect(user.mustChangePassword).toBe(false);
    expect(log.security('password-changed').filter((l) => l.userId === p.id)).toEqual([expect.objectContaining({ endedSessions: 2 })]);
    // The old password no longer signs in; the new one does.
    const again = await api.anonymous();
    await again.post('/api/auth/login', { email: 'two.phones@example.com', password: p.temporary }).expect(401);
    await api.signIn('two.phones@example.com', STRONG);
  });
});

describe('POST /api/auth/password: guessing the current password', () => {
  it('is limited per account (3 wrong tries in this test), even with the right one after, and the hash stays', async () => {
    const p = await person('guessed.at@example.com', 'Gus Guessed');
    const before = (await User.findByPk(p.id))!.passwordHash;
    for (let i = 0; i < 3; i++) {
      const res = await p.client.post('/api/auth/password', { currentPassword: `guess-${i}`, newPassword: STRONG }).expect(400);
      expect(res.body.error.code).toBe('wrong_password');
    }
    const limited = await p.client.post('/api/auth/password', { currentPassword: p.temporary, newPassword: STRONG }).expect(429);
    expect(limited.body.error).toEqual({
      code: 'too_many_attempts',
      message: 'Too many wrong current passwords. Wait 15 minutes and try again, or ask an administrator for a new temporary password.',
      retryAfterSeconds: expect.any(Number),
    });
    // The window (15 minutes) started with the first wrong try, moments ago.
    expect(limited.body.error.retryAfterSeconds).toBeGreaterThan(14 * 60);
    expect(limited.body.error.retryAfterSeconds).toBeLessThanOrEqual(15 * 60);
    expect(limited.headers['retry-after']).toBe(String(limited.body.error.retryAfterSeconds));
    expect((await User.findByPk(p.id))!.passwordHash).toBe(before);
    expect(log.security('password-change-failed').filter((l) => l.userId === p.id)).toHaveLength(3);
    expect(log.security('password-change-limited').filter((l) => l.userId === p.id)).toHaveLength(1);
  });

  it('counts only wrong ones, once answered: a burst of tries with the right password is never refused', async () => {
    const p = await person('burst.right@example.com', 'Bea Burst');
    // Five tries sent at once with the right current password, each refused for its new password (the same as the current).
    const burst = await Promise.all(
      Array.from({ length: 5 }, () => p.client.post('/api/auth/password', { currentPassword: p.temporary, newPassword: p.temporary })),
    );
    expect(burst.map((r) => [r.status, r.body.error.code])).toEqual(Array.from({ length: 5 }, () => [400, 'same_password']));
    expect(log.security('password-change-limited').filter((l) => l.userId === p.id)).toEqual([]);
    // Wrong ones sent at once are still held to the limit of 3: three are answered, the rest refused.
    const wrong = await Promise.all(
      Array.from({ length: 5 }, (_, i) => p.client.post('/api/auth/password', { currentPassword: `guess-${i}`, newPassword: STRONG })),
    );
    expect(wrong.map((r) => r.status).sort()).toEqual([400, 400, 400, 429, 429]);
    expect(log.security('password-change-failed').filter((l) => l.userId === p.id)).toHaveLength(3);
  });

  it('does not count a weak new password as a wrong guess', async () => {
    const p = await person('weak.not.guess@example.com', 'Wendel Notguess');
    for (let i = 0; i < 4; i++) await p.client.post('/api/auth/password', { currentPassword: p.temporary, newPassword: 'aaaaaaaaaa' }).expect(400);
    await p.client.post('/api/auth/password', { currentPassword: p.temporary, newPassword: STRONG }).expect(200);
  });
});

describe('POST /api/users/:id/reset-password', () => {
  it('ends all sessions of the account and logs who reset it', async () => {
    const p = await person('reset.me@example.com', 'Rhea Reset');
    const admin = await api.as('admin');
    const res = await admin.post(`/api/users/${p.id}/reset-password`).expect(200);
    expect(res.body.temporaryPassword).toHaveLength(12);
    await p.client.get('/api/auth/me').expect(401);
    expect(await Session.count({ where: { userId: p.id } })).toBe(0);
    expect(log.security('password-reset').filter((l) => l.userId === p.id)).toEqual([expect.objectContaining({ actorId: api.users.admin.id })]);
  });
});
