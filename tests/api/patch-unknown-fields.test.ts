import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CableType, Ticket, User } from '../../server/db/models';
import { startApi, type TestApi } from './support/api';
import { makeRun } from './support/field-fixtures';

// A change (PATCH) sends only the fields it changes. A field name the server does not know (a typing slip in a
// script, an older client) was dropped without a word and the answer was 200, as if the change had been made.

let api: TestApi;

beforeAll(async () => {
  api = await startApi();
});
afterAll(() => api.close());

function expectNamed(res: { status: number; body: { error: { code: string; fields: Array<{ field: string; message: string }> } } }, field: string) {
  expect(res.status).toBe(400);
  expect(res.body.error.code).toBe('invalid_input');
  expect(res.body.error.fields).toContainEqual({ field, message: 'is not expected here' });
}

describe('a change naming a field the server does not know', () => {
  it('is refused for a ticket, naming the field, and nothing of it is saved', async () => {
    const { site, run } = await makeRun('Unknown field run');
    const ticket = await Ticket.create({ title: 'Open on the feeder', siteId: site.id, cableRunId: run.id, priority: 'normal', status: 'raised', createdById: api.users.supervisor.id });
    const sup = await api.as('supervisor');
    expectNamed(await sup.patch(`/api/tickets/${ticket.id}`, { priority: 'urgent', dueDat: '2027-01-15' }), 'dueDat');
    expect((await Ticket.findByPk(ticket.id))!.priority).toBe('normal');
  });

  it('is refused for a user, naming the field, and nothing of it is saved', async () => {
    const admin = await api.as('admin');
    const tech = api.users.technician;
    expectNamed(await admin.patch(`/api/users/${tech.id}`, { name: 'Tess Tech-Ward', rol: 'supervisor' }), 'rol');
    expect((await User.findByPk(tech.id))!.name).toBe('Tess Tech');
  });

  it('is refused for a cable type, naming the field, and nothing of it is saved', async () => {
    const cable = (await CableType.findOne({ where: { name: 'Test solid PE coax' } }))!;
    const planner = await api.as('planner');
    expectNamed(await planner.patch(`/api/cables/${cable.id}`, { reason: 'Datasheet revision 3', notes: 'Rev 3', vff: 0.7 }), 'vff');
    expect((await CableType.findByPk(cable.id))!.notes).toBeNull();
  });

  it('is refused for one’s own preferences, naming the field', async () => {
    const tech = await api.as('technician');
    expectNamed(await tech.patch('/api/auth/me', { unitPreference: 'ft', theme: 'dark' }), 'theme');
    expect((await User.findByPk(api.users.technician.id))!.unitPreference).toBe('m');
  });
});
