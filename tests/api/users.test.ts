import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startApi, type TestApi } from './support/api';
import { confirmedFinding, supervisedRun } from './tickets.support';

let api: TestApi;
beforeAll(async () => {
  api = await startApi();
});
afterAll(() => api.close());

describe('POST /api/users', () => {
  it('creates a user with a temporary password that signs in and must be changed', async () => {
    const admin = await api.as('admin');
    const res = await admin.post('/api/users', { email: 'New.Person@example.com', name: 'New Person', role: 'technician' }).expect(201);
    expect(res.body.user).toMatchObject({ email: 'new.person@example.com', role: 'technician', mustChangePassword: true, active: true });
    expect(res.body.temporaryPassword).toHaveLength(12);
    const them = await api.signIn('new.person@example.com', res.body.temporaryPassword);
    const me = await them.get('/api/auth/me').expect(200);
    expect(me.body.mustChangePassword).toBe(true);
    const blocked = await them.get('/api/sites').expect(403);
    expect(blocked.body.error.code).toBe('password_change_required');
    await them.post('/api/auth/password', { currentPassword: res.body.temporaryPassword, newPassword: 'a-longer-secret' }).expect(200);
    expect((await them.get('/api/auth/me')).body.mustChangePassword).toBe(false);
    await them.get('/api/sites').expect(200);
  });

  it('rejects a duplicate e-mail with 409 naming the field', async () => {
    const admin = await api.as('admin');
    const res = await admin.post('/api/users', { email: 'planner.test@example.com', name: 'Dup', role: 'planner' }).expect(409);
    expect(res.body.error.fields).toEqual([{ field: 'email', message: 'is already in use' }]);
  });

  it('answers 409 to all but one of the same new e-mail sent at once (a double-click), and stores one user', async () => {
    const admin = await api.as('admin');
    const emails = ['twice@example.com', 'twice@example.com', 'Twice@Example.com'];
    const answers = await Promise.all(emails.map((email) => admin.post('/api/users', { email, name: 'Twice Sent', role: 'technician' })));
    expect(answers.map((r) => r.status).sort()).toEqual([201, 409, 409]);
    for (const r of answers.filter((a) => a.status === 409)) expect(r.body.error.fields).toEqual([{ field: 'email', message: 'is already in use' }]);
    const list = await admin.get('/api/users?q=twice').expect(200);
    expect(list.body.items.map((u: { email: string }) => u.email)).toEqual(['twice@example.com']);
  });

  it('rejects an unknown role', async () => {
    const admin = await api.as('admin');
    const res = await admin.post('/api/users', { email: 'x@example.com', name: 'X', role: 'boss' }).expect(400);
    expect(res.body.error.fields[0]).toEqual({ field: 'role', message: 'must be one of technician, supervisor, planner, admin' });
  });
});

describe('PATCH /api/users/:id', () => {
  it('changes a role', async () => {
    const admin = await api.as('admin');
    const created = await admin.post('/api/users', { email: 'mover@example.com', name: 'Mover', role: 'technician' }).expect(201);
    const res = await admin.patch(`/api/users/${created.body.user.id}`, { role: 'supervisor' }).expect(200);
    expect(res.body.role).toBe('supervisor');
  });

  it("ends a deactivated user's sessions at once", async () => {
    const admin = await api.as('admin');
    const created = await admin.post('/api/users', { email: 'leaver@example.com', name: 'Leaver', role: 'technician' }).expect(201);
    const leaver = await api.signIn('leaver@example.com', created.body.temporaryPassword);
    await leaver.get('/api/auth/me').expect(200);
    await admin.patch(`/api/users/${created.body.user.id}`, { active: false }).expect(200);
    await leaver.get('/api/auth/me').expect(401);
    const again = await api.anonymous();
    const res = await again.post('/api/auth/login', { email: 'leaver@example.com', password: created.body.temporaryPassword }).expect(401);
    expect(res.body.error.message).toBe('This account has been deactivated. Ask an administrator.');
  });

  it('says how many open repair tickets a deactivated person still holds', async () => {
    const admin = await api.as('admin');
    const created = await admin.post('/api/users', { email: 'holder@example.com', name: 'Holder', role: 'technician' }).expect(201);
    const fx = await supervisedRun(api, 'Holder run');
    const finding = await confirmedFinding(api, fx.run.id, 60);
    const sup = await api.as('supervisor');
    await sup.post('/api/tickets', { findingIds: [finding.id], assigneeId: created.body.user.id }).expect(201);
    const res = await admin.patch(`/api/users/${created.body.user.id}`, { active: false }).expect(200);
    expect(res.body).toMatchObject({ active: false, openTicketCount: 1 });
  });

  it('does not let an admin deactivate themself', async () => {
    const admin = await api.as('admin');
    const res = await admin.patch(`/api/users/${api.users.admin.id}`, { active: false }).expect(400);
    expect(res.body.error.code).toBe('cannot_demote_self');
  });

  it('answers 404 for an unknown user', async () => {
    const admin = await api.as('admin');
    await admin.patch('/api/users/424242', { role: 'planner' }).expect(404);
  });
});
