import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { verifyPassword } from '../../server/auth/passwords';
import { User } from '../../server/db/models';
import { startApi, TEST_PASSWORD, type TestApi } from './support/api';

/**
 * A password change checks the current password, then hashes the new one, then stores it. An administrator's
 * reset (or a change made on another phone) that lands in between must not be overwritten unseen: the reset
 * answered with a temporary password that has to work.
 */
const gate = vi.hoisted(() => {
  const held = new Map<string, { reached: () => void; release: Promise<void> }>();
  return {
    held,
    /** Holds the hashing of `password` until `release()` is called; `reached` resolves when the hashing starts. */
    hold(password: string) {
      let reached!: () => void;
      let release!: () => void;
      const reachedP = new Promise<void>((r) => (reached = r));
      held.set(password, { reached, release: new Promise<void>((r) => (release = r)) });
      return { reached: reachedP, release: () => release() };
    },
  };
});

vi.mock('../../server/auth/passwords', async (importOriginal) => {
  const real = await importOriginal<typeof import('../../server/auth/passwords')>();
  return {
    ...real,
    hashPassword: async (password: string) => {
      const h = gate.held.get(password);
      if (h) {
        gate.held.delete(password);
        h.reached();
        await h.release;
      }
      return real.hashPassword(password);
    },
  };
});

let api: TestApi;
beforeAll(async () => {
  api = await startApi();
});
afterAll(() => api.close());

describe('POST /api/auth/password while the password is reset', () => {
  it('refuses with 409 and keeps the reset when an administrator resets the password during the change', async () => {
    const NEW = 'Quartz-lantern-meadow-72';
    const tech = await api.as('technician');
    const held = gate.hold(NEW);
    const changing = tech.post('/api/auth/password', { currentPassword: TEST_PASSWORD, newPassword: NEW }).then((r) => r);
    await held.reached;
    const admin = await api.as('admin');
    const reset = await admin.post(`/api/users/${api.users.technician.id}/reset-password`).expect(200);
    held.release();
    const res = await changing;
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('password_changed_meanwhile');
    const user = (await User.findByPk(api.users.technician.id))!;
    expect(await verifyPassword(reset.body.temporaryPassword, user.passwordHash)).toBe(true);
    expect(await verifyPassword(NEW, user.passwordHash)).toBe(false);
    expect(user.mustChangePassword).toBe(true);
    const again = await api.signIn('technician.test@example.com', reset.body.temporaryPassword);
    await again.get('/api/auth/me').expect(200);
  });
});
