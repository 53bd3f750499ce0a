import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Finding, Ticket, TicketFinding } from '../../server/db/models';
import { startApi, type TestApi } from './support/api';
import { confirmedFinding, supervisedRun } from './tickets.support';

// Supervisors raising a repair ticket for the same finding at the same moment, or one raising it while a
// reviewer dismisses the finding: a finding may be on one active ticket only, and a dismissed finding on none.
// PostgreSQL runs the transactions side by side, so each check must hold against the others' writes.

let api: TestApi;
beforeAll(async () => {
  api = await startApi();
});
afterAll(() => api.close());

async function activeTicketsOf(findingId: number): Promise<number> {
  const links = await TicketFinding.findAll({ where: { findingId } });
  return Ticket.count({
    where: { id: links.map((l) => l.ticketId), status: ['raised', 'assigned', 'under-way', 'fixed', 'signed-off'] },
  });
}

describe('repair tickets raised at once', () => {
  it('put a finding on one ticket only when several supervisors raise one for it at the same moment', async () => {
    const { run } = await supervisedRun(api, 'Ticket race run');
    const sups = [];
    for (let i = 0; i < 6; i++) sups.push(await api.as('supervisor'));
    for (let round = 0; round < 3; round++) {
      const finding = await confirmedFinding(api, run.id, 60 + 30 * round);
      const results = await Promise.all(sups.map((s) => s.post('/api/tickets', { findingIds: [finding.id], priority: 'high' })));
      const statuses = results.map((r) => r.status).sort();
      expect(statuses).toEqual([201, 409, 409, 409, 409, 409]);
      for (const r of results.filter((x) => x.status === 409)) expect(r.body.error.code).toBe('finding_already_ticketed');
      expect(await activeTicketsOf(finding.id)).toBe(1);
    }
  });

  it('never leaves a dismissed finding on an open ticket when the ticket is raised while the finding is dismissed', async () => {
    const { run } = await supervisedRun(api, 'Ticket or dismiss run');
    const sup = await api.as('supervisor');
    const reviewer = await api.as('supervisor');
    for (let round = 0; round < 4; round++) {
      const finding = await confirmedFinding(api, run.id, 50 + 25 * round);
      const [t, d] = await Promise.all([
        sup.post('/api/tickets', { findingIds: [finding.id] }),
        reviewer.post(`/api/findings/${finding.id}/reverse`, { to: 'dismissed', reason: 'A splice, not a fault' }),
      ]);
      const status = (await Finding.findByPk(finding.id))!.status;
      const open = await activeTicketsOf(finding.id);
      if (t.status === 201) {
        expect(d.status).toBe(409);
        expect(d.body.error.code).toBe('on_open_ticket');
        expect([status, open]).toEqual(['confirmed', 1]);
      } else {
        expect(t.status).toBe(422);
        expect(t.body.error.code).toBe('finding_not_confirmed');
        expect(d.status).toBe(200);
        expect([status, open]).toEqual(['dismissed', 0]);
      }
    }
  });
});
