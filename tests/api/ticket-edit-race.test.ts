import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { hashPassword } from '../../server/auth/passwords';
import { MailJob, Ticket, TicketEvent, User } from '../../server/db/models';
import { startApi, TEST_PASSWORD, type Client, type TestApi } from './support/api';
import { confirmedFinding, supervisedRun } from './tickets.support';

// Two supervisors open the same unassigned ticket and each gives it to a different technician. Both answers were 200:
// the second silently took the repair off the person the first had just given it to (who had already been e-mailed),
// and neither supervisor knew. The edit form sends the values it started from; a field someone else changed meanwhile
// is refused (409) rather than overwritten, as the cable library and the sites already do.

let api: TestApi;
let first: Client;
let second: Client;
let other: User;

beforeAll(async () => {
  api = await startApi();
  first = await api.as('supervisor');
  second = await api.as('supervisor');
  other = await User.create({ email: 'otto.other@example.com', name: 'Otto Other', role: 'technician', passwordHash: await hashPassword(TEST_PASSWORD) });
});
afterAll(() => api.close());

async function raisedTicket(name: string, faultM: number) {
  const fx = await supervisedRun(api, name);
  const finding = await confirmedFinding(api, fx.run.id, faultM);
  return (await first.post('/api/tickets', { findingIds: [finding.id] }).expect(201)).body as { id: number };
}

describe('two supervisors editing one ticket', () => {
  it('refuses the later assignment made from the ticket as it was, naming who has it now, and changes nothing', async () => {
    const ticket = await raisedTicket('Edit race run', 90);
    await first.patch(`/api/tickets/${ticket.id}`, { assigneeId: api.users.technician.id, basedOn: { assigneeId: null } }).expect(200);
    const events = await TicketEvent.count({ where: { ticketId: ticket.id } });
    const mails = await MailJob.count();

    const late = await second.patch(`/api/tickets/${ticket.id}`, { assigneeId: other.id, comment: 'Otto is nearer', basedOn: { assigneeId: null } });
    expect(late.status).toBe(409);
    expect(late.body.error.code).toBe('changed_meanwhile');
    expect(late.body.error.fields).toEqual([{ field: 'assigneeId', message: `is now ${api.users.technician.name}; you started from nobody` }]);
    expect(late.body.error.message).toMatch(/^Someone else changed assigneeId of ticket \d+ after you opened it \(last saved by .+ at \d{4}-\d\d-\d\dT/);

    const now = (await Ticket.findByPk(ticket.id))!;
    expect([now.assigneeId, now.status]).toEqual([api.users.technician.id, 'assigned']);
    expect(await TicketEvent.count({ where: { ticketId: ticket.id } })).toBe(events);
    expect(await MailJob.count()).toBe(mails);
  });

  it('lets exactly one of two assignments sent at once through', async () => {
    const ticket = await raisedTicket('Edit race together run', 120);
    const answers = await Promise.all([
      first.patch(`/api/tickets/${ticket.id}`, { assigneeId: api.users.technician.id, basedOn: { assigneeId: null } }),
      second.patch(`/api/tickets/${ticket.id}`, { assigneeId: other.id, basedOn: { assigneeId: null } }),
    ]);
    expect(answers.map((r) => r.status).sort()).toEqual([200, 409]);
    const won = answers.find((r) => r.status === 200)!;
    const now = (await Ticket.findByPk(ticket.id))!;
    expect(now.assigneeId).toBe(won.body.assignee.id);
    expect(await TicketEvent.count({ where: { ticketId: ticket.id, kind: 'assigned' } })).toBe(1);
  });

  it('keeps a change to another field, and a change to the value the other already chose', async () => {
    const ticket = await raisedTicket('Edit race merge run', 150);
    await first.patch(`/api/tickets/${ticket.id}`, { priority: 'high', basedOn: { priority: 'normal' } }).expect(200);
    // The second editor opened it at normal priority and no due date, and changes the date only: kept.
    const soon = new Date(Date.now() + 7 * 86_400_000).toISOString().slice(0, 10);
    await second.patch(`/api/tickets/${ticket.id}`, { dueDate: soon, basedOn: { dueDate: null } }).expect(200);
    // Both wanted it high: no conflict, and nothing else to change.
    const same = await second.patch(`/api/tickets/${ticket.id}`, { priority: 'high', dueDate: soon, basedOn: { priority: 'normal', dueDate: soon } });
    expect(same.status).toBe(400);
    expect(same.body.error.code).toBe('nothing_changed');
    // But lowering it from the normal the editor saw is refused.
    const lower = await second.patch(`/api/tickets/${ticket.id}`, { priority: 'low', basedOn: { priority: 'normal' } });
    expect(lower.status).toBe(409);
    expect(lower.body.error.fields).toEqual([{ field: 'priority', message: 'is now high; you started from normal' }]);
    const now = (await Ticket.findByPk(ticket.id))!;
    expect([now.priority, now.dueDate]).toEqual(['high', soon]);
  });

  it('refuses a basedOn naming a field it does not know, by name', async () => {
    const ticket = await raisedTicket('Edit race strict run', 60);
    const res = await first.patch(`/api/tickets/${ticket.id}`, { priority: 'high', basedOn: { priorty: 'normal' } });
    expect(res.status).toBe(400);
    expect(res.body.error.fields).toContainEqual({ field: 'basedOn.priorty', message: 'is not expected here' });
    // basedOn alone changes nothing.
    const only = await first.patch(`/api/tickets/${ticket.id}`, { basedOn: { priority: 'normal' } });
    expect(only.status).toBe(400);
    expect(only.body.error.code).toBe('invalid_input');
  });
});
