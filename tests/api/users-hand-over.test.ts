import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { hashPassword } from '../../server/auth/passwords';
import { Ticket, TicketEvent, User } from '../../server/db/models';
import type { OutboxMessageView } from '../../shared/schemas/outbox';
import type { OpenRepairsView } from '../../shared/schemas/users';
import { startApi, TEST_PASSWORD, type Client, type TestApi } from './support/api';
import { eventually } from './mail.support';
import { confirmedFinding, supervisedRun } from './tickets.support';

describe('handing a person’s open repairs to another technician', () => {
  let api: TestApi;
  let admin: Client;
  let newcomer: User;
  let ticketIds: number[];

  beforeAll(async () => {
    api = await startApi();
    const fx = await supervisedRun(api, 'Hand-over run');
    newcomer = await User.create({ email: 'nia.new@example.com', name: 'Nia New', role: 'technician', passwordHash: await hashPassword(TEST_PASSWORD) });
    const sup = await api.as('supervisor');
    ticketIds = [];
    for (const faultM of [60, 150]) {
      const f = await confirmedFinding(api, fx.run.id, faultM);
      const t = await sup.post('/api/tickets', { findingIds: [f.id], assigneeId: api.users.technician.id }).expect(201);
      ticketIds.push(t.body.id);
    }
    // The second one is under way: it goes back to "assigned" for the new person.
    await (await api.as('technician')).post(`/api/tickets/${ticketIds[1]}/status`, { to: 'under-way' }).expect(200);
    admin = await api.as('admin');
  });
  afterAll(() => api?.close());

  it('lists the open repairs an administrator is about to hand over', async () => {
    const res = await admin.get(`/api/users/${api.users.technician.id}/open-repairs`).expect(200);
    const view = res.body as OpenRepairsView;
    expect(view.tickets.map((t) => [t.id, t.status, t.movable])).toEqual([
      [ticketIds[0], 'assigned', true],
      [ticketIds[1], 'under-way', true],
    ]);
  });

  it('refuses someone who is not an active technician, and the same person, naming the field', async () => {
    const planner = await admin.post(`/api/users/${api.users.technician.id}/hand-over-repairs`, { toUserId: api.users.planner.id }).expect(422);
    expect(planner.body.error.code).toBe('not_a_technician');
    expect(planner.body.error.fields).toEqual([{ field: 'toUserId', message: 'must be an active field technician' }]);
    const same = await admin.post(`/api/users/${api.users.technician.id}/hand-over-repairs`, { toUserId: api.users.technician.id }).expect(422);
    expect(same.body.error.code).toBe('same_person');
    const bad = await admin.post(`/api/users/${api.users.technician.id}/hand-over-repairs`, { toUserId: 'Nia' }).expect(400);
    expect(bad.body.error.fields[0].field).toBe('toUserId');
    // Nothing moved.
    expect((await Ticket.findAll({ where: { id: ticketIds } })).map((t) => t.assigneeId)).toEqual([api.users.technician.id, api.users.technician.id]);
  });

  it('moves every open repair at once, says so in each timeline and tells the new assignee', async () => {
    const res = await admin.post(`/api/users/${api.users.technician.id}/hand-over-repairs`, { toUserId: newcomer.id }).expect(200);
    expect(res.body).toEqual({ moved: ticketIds, to: { id: newcomer.id, name: 'Nia New' } });
    const tickets = await Ticket.findAll({ where: { id: ticketIds }, order: [['id', 'ASC']] });
    expect(tickets.map((t) => [t.assigneeId, t.status])).toEqual([
      [newcomer.id, 'assigned'],
      [newcomer.id, 'assigned'],
    ]);
    const events = await TicketEvent.findAll({ where: { ticketId: ticketIds[1], kind: 'assigned' }, order: [['id', 'ASC']] });
    const last = events[events.length - 1];
    expect([last.fromStatus, last.toStatus, last.actorId]).toEqual(['under-way', 'assigned', api.users.admin.id]);
    expect(last.comment).toBe('Handed over from Tess Tech to Nia New.');
    expect(JSON.parse(last.changes!)).toEqual({ assignee: ['Tess Tech', 'Nia New'] });
    const left = await admin.get(`/api/users/${api.users.technician.id}/open-repairs`).expect(200);
    expect((left.body as OpenRepairsView).tickets).toEqual([]);
    const mail = await eventually(async () => {
      const box = await admin.get('/api/outbox?to=nia.new%40example.com').expect(200);
      const items = box.body.items as OutboxMessageView[];
      return items.filter((m) => /assigned to you/.test(m.subject)).length === 2 ? items : undefined;
    }, 'two assignment e-mails to the new technician');
    for (const id of ticketIds) expect(mail.some((m) => m.subject.startsWith(`Ticket ${id} assigned to you`))).toBe(true);
  });

  it('is for administrators only', async () => {
    const sup = await api.as('supervisor');
    await sup.get(`/api/users/${api.users.technician.id}/open-repairs`).expect(403);
    await sup.post(`/api/users/${api.users.technician.id}/hand-over-repairs`, { toUserId: newcomer.id }).expect(403);
  });
});
