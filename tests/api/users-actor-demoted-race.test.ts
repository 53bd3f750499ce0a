import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { hashPassword } from '../../server/auth/passwords';
import { User } from '../../server/db/models';
import { startApi, TEST_PASSWORD, type Client, type TestApi } from './support/api';
import { pauseFirstRead } from './support/pause';

/**
 * An administrator whose role another administrator takes away while their own request is under way: the request
 * was allowed when it arrived, but by the time it writes the account may no longer manage users. A change of role
 * or activity already said so (409 no_longer_allowed); a new account and a password reset went ahead, so an account
 * on its way out could make a new administrator, or take over another one with a temporary password.
 */
let api: TestApi;
let n = 0;

beforeAll(async () => {
  api = await startApi();
});
afterAll(() => api.close());

/** Two fresh administrators, signed in. */
async function twoAdmins(): Promise<{ leaving: User; leavingClient: Client; other: Client }> {
  const hash = await hashPassword(TEST_PASSWORD);
  n++;
  const leaving = await User.create({ email: `leaving${n}@example.com`, name: `Lee Leaving ${n}`, role: 'admin', passwordHash: hash });
  await User.create({ email: `staying${n}@example.com`, name: `Stan Staying ${n}`, role: 'admin', passwordHash: hash });
  return { leaving, leavingClient: await api.signIn(leaving.email, TEST_PASSWORD), other: await api.signIn(`staying${n}@example.com`, TEST_PASSWORD) };
}

/** Holds the first read of a User that `matches`, made outside any transaction, until release(). */
const holdRead = (matches: (result: unknown, options: { where?: unknown; transaction?: unknown }) => boolean) =>
  pauseFirstRead(User, `hold-user-read-${n}`, matches, { inTransaction: false });

describe('an administrator demoted while their request is under way', () => {
  it('does not reset another person’s password', async () => {
    const { leaving, leavingClient, other } = await twoAdmins();
    const target = api.users.technician;
    const hashBefore = (await User.findByPk(target.id))!.passwordHash;
    const hold = holdRead((result) => (result as User | null)?.id === target.id);
    const reset = leavingClient.post(`/api/users/${target.id}/reset-password`).then((r) => r);
    await hold.reached;
    await other.patch(`/api/users/${leaving.id}`, { role: 'technician' }).expect(200);
    hold.release();
    const res = await reset;
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('no_longer_allowed');
    expect(res.body.temporaryPassword).toBeUndefined();
    const after = (await User.findByPk(target.id))!;
    expect(after.passwordHash).toBe(hashBefore);
    expect(after.mustChangePassword).toBe(false);
  });

  it('does not create an account, administrator or not', async () => {
    const { leaving, leavingClient, other } = await twoAdmins();
    const email = `late.admin${n}@example.com`;
    const hold = holdRead((_result, options) => JSON.stringify(options.where ?? {}).includes(email));
    const create = leavingClient.post('/api/users', { email, name: 'Late Admin', role: 'admin' }).then((r) => r);
    await hold.reached;
    await other.patch(`/api/users/${leaving.id}`, { role: 'planner' }).expect(200);
    hold.release();
    const res = await create;
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('no_longer_allowed');
    expect(await User.count({ where: { email } })).toBe(0);
  });

  it('still resets and creates while they are an administrator', async () => {
    const { leavingClient } = await twoAdmins();
    const reset = await leavingClient.post(`/api/users/${api.users.planner.id}/reset-password`).expect(200);
    expect(reset.body.temporaryPassword).toEqual(expect.any(String));
    const created = await leavingClient.post('/api/users', { email: `new.tech${n}@example.com`, name: 'New Tech', role: 'technician' }).expect(201);
    expect(created.body.user.email).toBe(`new.tech${n}@example.com`);
  });
});
