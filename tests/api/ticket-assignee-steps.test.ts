import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Ticket, TicketCloseout, TicketEvent } from '../../server/db/models';
import type { TicketDetail } from '../../shared/schemas/tickets';
import { startApi, type Client, type TestApi } from './support/api';
import { confirmedFinding, supervisedRun } from './tickets.support';

describe('the crew’s own steps on a ticket', () => {
  let api: TestApi;
  let sup: Client;
  let admin: Client;
  let tech: Client;
  let ticketId: number;

  beforeAll(async () => {
    api = await startApi();
    const fx = await supervisedRun(api, 'Crew steps run');
    sup = await api.as('supervisor');
    admin = await api.as('admin');
    tech = await api.as('technician');
    const finding = await confirmedFinding(api, fx.run.id, 100);
    ticketId = ((await sup.post('/api/tickets', { findingIds: [finding.id], assigneeId: api.users.technician.id }).expect(201)).body as TicketDetail).id;
  });
  afterAll(() => api?.close());

  it('offers a supervisor no start, pause or close-out on a ticket assigned to a technician, only their own steps', async () => {
    const seen = (await sup.get(`/api/tickets/${ticketId}`).expect(200)).body as TicketDetail;
    expect(seen.status).toBe('assigned');
    expect(seen.can.moves).toEqual([{ to: 'withdrawn', label: 'Withdraw' }]);
    expect(seen.can.closeOut).toBe(false);
    expect(seen.can.edit).toBe(true);
    expect(seen.can.comment).toBe(true);
    const own = (await tech.get(`/api/tickets/${ticketId}`).expect(200)).body as TicketDetail;
    expect(own.can.moves).toEqual([{ to: 'under-way', label: 'Start work' }]);
    expect(own.can.closeOut).toBe(true);
  });

  it('refuses a supervisor’s or an administrator’s start with 403, naming whose step it is, and changes nothing', async () => {
    const events = await TicketEvent.count({ where: { ticketId } });
    for (const who of [sup, admin]) {
      const res = await who.post(`/api/tickets/${ticketId}/status`, { to: 'under-way' }).expect(403);
      expect(res.body.error.code).toBe('assignee_only');
      expect(res.body.error.message).toBe(
        `Ticket ${ticketId} is assigned to Tess Tech: only they may start work on it. To have someone else do it, a supervisor assigns the ticket to them.`,
      );
    }
    expect((await Ticket.findByPk(ticketId))!.status).toBe('assigned');
    expect(await TicketEvent.count({ where: { ticketId } })).toBe(events);
  });

  it('lets the assignee start; then refuses a supervisor’s pause and close-out the same way', async () => {
    await tech.post(`/api/tickets/${ticketId}/status`, { to: 'under-way' }).expect(200);
    const seen = (await sup.get(`/api/tickets/${ticketId}`).expect(200)).body as TicketDetail;
    expect(seen.can.moves).toEqual([{ to: 'withdrawn', label: 'Withdraw' }]);
    expect(seen.can.closeOut).toBe(false);
    const pause = await sup.post(`/api/tickets/${ticketId}/status`, { to: 'assigned' }).expect(403);
    expect(pause.body.error.message).toBe(
      `Ticket ${ticketId} is assigned to Tess Tech: only they may pause work on it. To have someone else do it, a supervisor assigns the ticket to them.`,
    );
    const closeout = await sup
      .post(`/api/tickets/${ticketId}/closeout`, { found: { method: 'distance', fromEnd: 'A', distanceM: 101 }, cause: 'open-conductor', workDone: 'Jointed', fileCalibration: false })
      .expect(403);
    expect(closeout.body.error.code).toBe('assignee_only');
    expect(closeout.body.error.message).toContain('only they may record its close-out (where the fault was found and what was done)');
    expect((await Ticket.findByPk(ticketId))!.status).toBe('under-way');
    expect(await TicketCloseout.count({ where: { ticketId } })).toBe(0);
  });

  it('still lets the supervisor make the supervisor’s steps: the assignee closes out, the supervisor reopens', async () => {
    await tech
      .post(`/api/tickets/${ticketId}/closeout`, { found: { method: 'distance', fromEnd: 'A', distanceM: 101 }, cause: 'open-conductor', workDone: 'Jointed', fileCalibration: false })
      .expect(200);
    const seen = (await sup.get(`/api/tickets/${ticketId}`).expect(200)).body as TicketDetail;
    expect(seen.can.moves.map((m) => m.to)).toEqual(['signed-off', 'under-way']);
    const reopened = await sup.post(`/api/tickets/${ticketId}/status`, { to: 'under-way', comment: 'Still open-circuit' }).expect(200);
    expect(reopened.body.status).toBe('under-way');
  });
});
