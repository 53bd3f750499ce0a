import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { hashPassword } from '../../server/auth/passwords';
import { Ticket, TicketCloseout, User } from '../../server/db/models';
import { startApi, TEST_PASSWORD, type TestApi } from './support/api';
import { eventually } from './mail.support';
import { pauseFirstRead, someoneWaitsForALock } from './support/pause';
import { confirmedFinding, supervisedRun } from './tickets.support';

/**
 * An administrator hands a technician's open repairs to someone else at the moment the technician records the
 * close-out of one of them. Either the close-out comes first (the ticket is fixed and stays with who fixed it) or
 * the hand-over does (the ticket is the new person's, and the old assignee's close-out is refused). Never a fixed
 * repair sent back to "assigned" with its close-out recorded, as PostgreSQL allowed when the hand-over read the
 * tickets without holding them.
 */
let api: TestApi;
beforeAll(async () => {
  api = await startApi();
});
afterAll(() => api.close());

/** Pauses the hand-over's read of `userId`'s tickets until `release()`; `reached` resolves when it happens. */
const pauseTicketsOf = (userId: number) =>
  pauseFirstRead(
    Ticket,
    'pause-hand-over',
    // By then the condition names the column (assignee_id).
    (result, options) => Array.isArray(result) && (options.where as { assignee_id?: unknown } | undefined)?.assignee_id === userId,
  );

describe('handing over repairs while one of them is closed out', () => {
  it('never leaves a closed-out repair assigned again', async () => {
    const fx = await supervisedRun(api, 'Hand-over close-out run');
    const newcomer = await User.create({ email: 'hana.handed@example.com', name: 'Hana Handed', role: 'technician', passwordHash: await hashPassword(TEST_PASSWORD) });
    const sup = await api.as('supervisor');
    const tess = await api.as('technician');
    const admin = await api.as('admin');
    const finding = await confirmedFinding(api, fx.run.id, 70);
    const ticket = (await sup.post('/api/tickets', { findingIds: [finding.id], assigneeId: api.users.technician.id }).expect(201)).body.id as number;
    await tess.post(`/api/tickets/${ticket}/status`, { to: 'under-way' }).expect(200);

    const pause = pauseTicketsOf(api.users.technician.id);
    const handing = admin.post(`/api/users/${api.users.technician.id}/hand-over-repairs`, { toUserId: newcomer.id }).then((r) => r);
    await pause.reached;
    let closed: { status: number; body: { error?: { code: string } } } | null = null;
    const closing = tess
      .post(`/api/tickets/${ticket}/closeout`, { found: { method: 'distance', fromEnd: 'A', distanceM: 71 }, cause: 'open-conductor', workDone: 'Remade the joint' })
      .then((r) => (closed = r));
    await eventually(async () => closed !== null || (await someoneWaitsForALock(api)), 'the close-out to finish or wait');
    pause.release();
    const [handed] = await Promise.all([handing, closing]);

    expect(handed.status).toBe(200);
    const t = (await Ticket.findByPk(ticket))!;
    const closeouts = await TicketCloseout.count({ where: { ticketId: ticket } });
    if (closed!.status === 200) {
      // The close-out came first: the repair is fixed, with who fixed it, and was not handed over.
      expect([t.status, t.assigneeId, closeouts]).toEqual(['fixed', api.users.technician.id, 1]);
      expect(handed.body.moved).toEqual([]);
    } else {
      // The hand-over came first: the old assignee may no longer close it out.
      expect(closed!.status).toBe(403);
      expect([t.status, t.assigneeId, closeouts]).toEqual(['assigned', newcomer.id, 0]);
      expect(handed.body.moved).toEqual([ticket]);
    }
  });
});
