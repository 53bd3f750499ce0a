import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { SessionUser } from '../../server/auth/guards';
import { hashPassword } from '../../server/auth/passwords';
import { User } from '../../server/db/models';
import { AppError } from '../../server/errors';
import { updateUser } from '../../server/users/users.service';
import { startApi, TEST_PASSWORD, type TestApi } from './support/api';
import { captureLog } from './support/log-capture';

let api: TestApi;
const log = captureLog();
beforeAll(async () => {
  api = await startApi({ logLevel: 'info' }, { logDestination: log.stream });
});
afterAll(() => api.close());

const asSessionUser = (u: User): SessionUser => ({ id: u.id, email: u.email, name: u.name, role: u.role });

/** A second administrator beside the test one, so that exactly two are active. */
async function secondAdmin(email: string) {
  return User.create({ email, name: 'Bea Backup', role: 'admin', passwordHash: await hashPassword(TEST_PASSWORD) });
}

async function activeAdmins() {
  return User.count({ where: { role: 'admin', active: true } });
}

async function demoteAllAdminsBut(keep: number) {
  await User.update({ role: 'planner' }, { where: { role: 'admin' } });
  await User.update({ role: 'admin', active: true }, { where: { id: keep } });
}

describe('at least one active administrator', () => {
  it('refuses to demote the last active administrator with 409 and says why', async () => {
    await demoteAllAdminsBut(api.users.admin.id);
    const other = await secondAdmin('solo.check@example.com');
    const admin = await api.as('admin');
    // Deactivating the other one leaves the test admin: allowed.
    await admin.patch(`/api/users/${other.id}`, { active: false }).expect(200);
    // The service refuses the last one even for a request that got past the route's checks.
    await expect(updateUser(api.app.ctx, api.users.admin.id, { role: 'planner' }, asSessionUser(other))).rejects.toMatchObject({
      status: 409,
      code: 'last_admin',
      message: 'Ada Admin is the last active administrator: make someone else an administrator first, so Rholog always has one.',
    });
    expect(await activeAdmins()).toBe(1);
    expect((await User.findByPk(api.users.admin.id))!.role).toBe('admin');
  });

  it('lets exactly one of two administrators demoting each other at the same moment succeed', async () => {
    await demoteAllAdminsBut(api.users.admin.id);
    const ada = (await User.findByPk(api.users.admin.id))!;
    const bea = await secondAdmin('bea.race@example.com');
    expect(await activeAdmins()).toBe(2);
    // Both requests were allowed when they arrived (each actor was an administrator); the rule is decided inside the transactions.
    const results = await Promise.allSettled([
      updateUser(api.app.ctx, bea.id, { role: 'planner' }, asSessionUser(ada)),
      updateUser(api.app.ctx, ada.id, { role: 'planner' }, asSessionUser(bea)),
    ]);
    const ok = results.filter((r) => r.status === 'fulfilled');
    const refused = results.filter((r): r is PromiseRejectedResult => r.status === 'rejected');
    expect(ok).toHaveLength(1);
    expect(refused).toHaveLength(1);
    expect(refused[0].reason).toBeInstanceOf(AppError);
    expect(refused[0].reason).toMatchObject({ status: 409, code: 'last_admin' });
    expect((refused[0].reason as Error).message).toMatch(/is the last active administrator: make someone else an administrator first/);
    expect(await activeAdmins()).toBe(1);
  });

  it('keeps one administrator when two deactivate each other at once through the API', async () => {
    await demoteAllAdminsBut(api.users.admin.id);
    const bea = await secondAdmin('bea.api@example.com');
    const ada = await api.as('admin');
    const beaClient = await api.signIn('bea.api@example.com', TEST_PASSWORD);
    const [a, b] = await Promise.all([ada.patch(`/api/users/${bea.id}`, { active: false }), beaClient.patch(`/api/users/${api.users.admin.id}`, { active: false })]);
    const statuses = [a.status, b.status].sort();
    expect(statuses[0]).toBe(200);
    // The loser is refused either by the invariant (409, if its request was already past the guard)
    // or by the guard itself (401/403, if the winner's change was already committed when it arrived).
    const loser = a.status === 200 ? b : a;
    expect([401, 403, 409]).toContain(loser.status);
    expect(loser.body.error.message.length).toBeGreaterThan(10);
    expect(await activeAdmins()).toBe(1);
  });

  it('logs role changes and deactivations with who did them', async () => {
    await demoteAllAdminsBut(api.users.admin.id);
    const admin = await api.as('admin');
    const created = await admin.post('/api/users', { email: 'logged.mover@example.com', name: 'Logged Mover', role: 'technician' }).expect(201);
    const id = created.body.user.id as number;
    await admin.patch(`/api/users/${id}`, { role: 'supervisor' }).expect(200);
    await admin.patch(`/api/users/${id}`, { active: false }).expect(200);
    await admin.patch(`/api/users/${id}`, { active: true }).expect(200);
    expect(log.security('role-changed').filter((l) => l.userId === id)).toEqual([
      expect.objectContaining({ level: 30, userId: id, actorId: api.users.admin.id, from: 'technician', to: 'supervisor' }),
    ]);
    expect(log.security('user-deactivated').filter((l) => l.userId === id)).toEqual([expect.objectContaining({ actorId: api.users.admin.id })]);
    expect(log.security('user-reactivated').filter((l) => l.userId === id)).toHaveLength(1);
  });
});
