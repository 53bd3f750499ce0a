import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { hashPassword } from '../../server/auth/passwords';
import { Ticket, TicketEvent, User } from '../../server/db/models';
import type { OutboxMessageView } from '../../shared/schemas/outbox';
import { startApi, TEST_PASSWORD, type Client, type TestApi } from './support/api';
import { eventually } from './mail.support';
import { confirmedFinding, supervisedRun } from './tickets.support';

// A technician is made a planner (or a supervisor, or an administrator) while repairs are assigned to them. Only an
// active technician may be given a repair, yet the ones they had stayed theirs: "assigned" to a planner who cannot
// work or close them out, out of every supervisor's list of repairs waiting for someone. Their repairs not yet fixed
// must go back to the supervisors, unassigned, in the change of role itself; a fixed one waits for sign-off as before.

let api: TestApi;
let admin: Client;
let sup: Client;

beforeAll(async () => {
  api = await startApi();
  admin = await api.as('admin');
  sup = await api.as('supervisor');
});
afterAll(() => api.close());

async function technicianWithRepairs(email: string, name: string) {
  const fx = await supervisedRun(api, `${name} run`);
  const person = await User.create({ email, name, role: 'technician', passwordHash: await hashPassword(TEST_PASSWORD) });
  const ids: number[] = [];
  for (const faultM of [60, 110, 150]) {
    const f = await confirmedFinding(api, fx.run.id, faultM);
    ids.push((await sup.post('/api/tickets', { findingIds: [f.id], assigneeId: person.id }).expect(201)).body.id);
  }
  const own = await api.signIn(email, TEST_PASSWORD);
  // The second is under way; the third is fixed (closed out, waiting for a supervisor's sign-off).
  await own.post(`/api/tickets/${ids[1]}/status`, { to: 'under-way' }).expect(200);
  await own
    .post(`/api/tickets/${ids[2]}/closeout`, { found: { method: 'distance', fromEnd: 'A', distanceM: 149 }, cause: 'open-conductor', workDone: 'Jointed the pair', fileCalibration: false })
    .expect(200);
  return { person, ids };
}

describe('changing the role of a technician who has repairs', () => {
  it('gives their repairs not yet fixed back to the supervisors, unassigned, with the reason in each timeline', async () => {
    const { person, ids } = await technicianWithRepairs('rafa.role@example.com', 'Rafa Role');
    const res = await admin.patch(`/api/users/${person.id}`, { role: 'planner' }).expect(200);
    expect(res.body.role).toBe('planner');
    expect(res.body.unassignedTicketIds).toEqual([ids[0], ids[1]]);
    // The fixed one is still theirs until a supervisor signs it off.
    expect(res.body.openTicketCount).toBe(1);

    const tickets = await Ticket.findAll({ where: { id: ids }, order: [['id', 'ASC']] });
    expect(tickets.map((t) => [t.assigneeId, t.status])).toEqual([
      [null, 'raised'],
      [null, 'raised'],
      [person.id, 'fixed'],
    ]);
    const last = await TicketEvent.findOne({ where: { ticketId: ids[1] }, order: [['id', 'DESC']] });
    expect([last!.kind, last!.fromStatus, last!.toStatus, last!.actorId]).toEqual(['assigned', 'under-way', 'raised', api.users.admin.id]);
    expect(last!.comment).toBe('Rafa Role is now a planner and no longer works repairs: the ticket waits for a supervisor to assign it.');
    expect(JSON.parse(last!.changes!)).toEqual({ assignee: ['Rafa Role', null] });

    // The person is told each one is no longer theirs.
    const mail = await eventually(async () => {
      const box = await admin.get('/api/outbox?to=rafa.role%40example.com').expect(200);
      const items = (box.body.items as OutboxMessageView[]).filter((m) => / is no longer yours/.test(m.subject));
      return items.length === 2 ? items : undefined;
    }, 'two e-mails saying the repairs are no longer theirs');
    for (const id of [ids[0], ids[1]]) expect(mail.some((m) => m.subject.startsWith(`Ticket ${id} is no longer yours`))).toBe(true);

    // A supervisor can give them to a technician again at once.
    await sup.patch(`/api/tickets/${ids[0]}`, { assigneeId: api.users.technician.id }).expect(200);
  });

  it('does the same for a technician made an administrator, and leaves other roles’ changes alone', async () => {
    const { person, ids } = await technicianWithRepairs('ada.admin@example.com', 'Ada Promoted');
    const res = await admin.patch(`/api/users/${person.id}`, { role: 'admin' }).expect(200);
    expect(res.body.unassignedTicketIds).toEqual([ids[0], ids[1]]);
    const last = await TicketEvent.findOne({ where: { ticketId: ids[0] }, order: [['id', 'DESC']] });
    expect(last!.comment).toBe('Ada Promoted is now an administrator and no longer works repairs: the ticket waits for a supervisor to assign it.');

    // Back to technician and on to supervisor: nothing of theirs is open and not fixed, nothing moves.
    const back = await admin.patch(`/api/users/${person.id}`, { role: 'technician' }).expect(200);
    expect(back.body.unassignedTicketIds).toEqual([]);
    const events = await TicketEvent.count();
    const fixed = (await Ticket.findByPk(ids[2]))!;
    expect([fixed.assigneeId, fixed.status]).toEqual([person.id, 'fixed']);
    await admin.patch(`/api/users/${person.id}`, { name: 'Ada Renamed' }).expect(200);
    expect(await TicketEvent.count()).toBe(events);
  });
});
