import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Session } from '../../server/db/models';
import { startApi, TEST_PASSWORD, type Client, type TestApi } from './support/api';
import { captureLog } from './support/log-capture';

let api: TestApi;
const log = captureLog();
// One proxy in front (TRUST_PROXY=1): the client address is the last X-Forwarded-For entry, the one the proxy wrote.
// Tiny delays keep the slow-down cheap here; their values are checked in the log, never by a clock.
const LIMITS = { maxPerPair: 3, maxPerAddress: 6, windowMs: 60_000, slowAfter: 2, delayMs: 1, maxDelayMs: 4 };
beforeAll(async () => {
  api = await startApi({ trustProxyHops: 1, login: LIMITS, logLevel: 'info' }, { logDestination: log.stream });
});
afterAll(() => api.close());

/** A sign-in as seen behind the proxy from `address` (what the visitor put in X-Forwarded-For comes first). */
function signInFrom(c: Client, address: string, email: string, password: string, claimed?: string) {
  return c.agent
    .post('/api/auth/login')
    .set('x-csrf-token', c.csrf)
    .set('x-forwarded-for', claimed ? `${claimed}, ${address}` : address)
    .send({ email, password });
}

describe('failed sign-ins on one account from one address', () => {
  it('lock that pair only: the owner signs in from another address while one address guesses', async () => {
    const attacker = await api.anonymous();
    for (let i = 0; i < 3; i++) await signInFrom(attacker, '203.0.113.10', 'supervisor.test@example.com', `guess-${i}`).expect(401);
    const locked = await signInFrom(attacker, '203.0.113.10', 'supervisor.test@example.com', TEST_PASSWORD).expect(429);
    expect(locked.body.error).toEqual({
      code: 'too_many_attempts',
      message: 'Too many failed sign-ins for this account from this address. Try again in 1 minute.',
      retryAfterSeconds: Number(locked.headers['retry-after']),
    });
    const owner = await api.anonymous();
    const ok = await signInFrom(owner, '198.51.100.7', 'supervisor.test@example.com', TEST_PASSWORD).expect(200);
    expect(ok.body.user.email).toBe('supervisor.test@example.com');
    expect(await Session.count({ where: { userId: api.users.supervisor.id } })).toBe(1);
    // The same address may still sign in to another account.
    await signInFrom(attacker, '203.0.113.10', 'planner.test@example.com', TEST_PASSWORD).expect(200);

    const failed = log.security('sign-in-failed').filter((l) => l.email === 'supervisor.test@example.com');
    expect(failed.map((l) => [l.ip, l.reason])).toEqual([
      ['203.0.113.10', 'wrong password'],
      ['203.0.113.10', 'wrong password'],
      ['203.0.113.10', 'wrong password'],
    ]);
    expect(log.security('sign-in-limited')).toEqual([
      expect.objectContaining({ level: 40, scope: 'account-and-address', email: 'supervisor.test@example.com', ip: '203.0.113.10' }),
    ]);
    // The account itself is slowed, not locked: after 2 failures each try waits 1 ms, doubling (2 ms after 3).
    expect(log.security('sign-in-slowed').filter((l) => l.email === 'supervisor.test@example.com').map((l) => [l.ip, l.failures, l.delayMs])).toEqual([
      ['203.0.113.10', 2, 1],
      ['198.51.100.7', 3, 2],
    ]);
    // Passwords, right or wrong, never reach the log.
    const written = JSON.stringify(log.lines);
    expect(written).not.toContain(TEST_PASSWORD);
    expect(written).not.toContain('guess-0');
  });
});

describe('failed sign-ins from one address', () => {
  it('are limited however the visitor rotates its own X-Forwarded-For entries', async () => {
    const c = await api.anonymous();
    for (let i = 0; i < 6; i++) {
      // A different made-up "client" each time; the proxy's entry (the real address) stays the same.
      await signInFrom(c, '192.0.2.44', `nobody${i}@example.com`, 'wrong', `10.9.8.${i}`).expect(401);
    }
    const res = await signInFrom(c, '192.0.2.44', 'nobody9@example.com', 'wrong', '10.9.8.99').expect(429);
    expect(res.body.error.message).toBe('Too many failed sign-ins from this address. Try again in 1 minute.');
    expect(log.security('sign-in-failed').filter((l) => l.ip === '192.0.2.44')).toHaveLength(6);
    expect(log.security('sign-in-limited').filter((l) => l.ip === '192.0.2.44')).toEqual([expect.objectContaining({ scope: 'address' })]);
  });
});

describe('sign-ins under way', () => {
  it('do not count against the limits: a burst of right passwords from one address all get in', async () => {
    // A crew behind one depot address signs in at the start of the shift, all at once: 12 right passwords in flight
    // together from one address (the address limit here is 6 failures, the pair limit 3).
    const roles = ['technician', 'supervisor', 'planner', 'admin'] as const;
    const clients = await Promise.all(Array.from({ length: 12 }, () => api.anonymous()));
    const answers = await Promise.all(clients.map((c, i) => signInFrom(c, '192.0.2.77', `${roles[i % 4]}.test@example.com`, TEST_PASSWORD)));
    expect(answers.map((r) => r.status)).toEqual(Array(12).fill(200));
    expect(log.security('sign-in-limited').filter((l) => l.ip === '192.0.2.77')).toEqual([]);
  });

  it('and failures in flight together are still limited, with the time to wait in the answer', async () => {
    const clients = await Promise.all(Array.from({ length: 10 }, () => api.anonymous()));
    const answers = await Promise.all(clients.map((c, i) => signInFrom(c, '192.0.2.78', 'planner.test@example.com', `wrong-${i}`)));
    // Tries on one account from one address are checked one after another: 3 failures, then the pair is locked.
    expect(answers.map((r) => r.status).sort()).toEqual([...Array(3).fill(401), ...Array(7).fill(429)]);
    const refused = answers.find((r) => r.status === 429)!;
    const seconds = Number(refused.headers['retry-after']);
    expect(seconds).toBeGreaterThan(0);
    expect(seconds).toBeLessThanOrEqual(60);
    expect(refused.body.error).toEqual({
      code: 'too_many_attempts',
      message: 'Too many failed sign-ins for this account from this address. Try again in 1 minute.',
      retryAfterSeconds: seconds,
    });
    // The right password from that address waits out the window like the wrong ones.
    const owner = await api.anonymous();
    await signInFrom(owner, '192.0.2.78', 'planner.test@example.com', TEST_PASSWORD).expect(429);
  });
});
