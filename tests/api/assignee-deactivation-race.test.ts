import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Ticket, User } from '../../server/db/models';
import { OPEN_STATUSES } from '../../shared/tickets/status';
import { startApi, type TestApi } from './support/api';
import { eventually } from './mail.support';
import { foundId, pauseFirstRead, someoneWaitsForALock } from './support/pause';
import { confirmedFinding, supervisedRun } from './tickets.support';

/**
 * A technician is deactivated (or given another role) by an administrator at the moment a supervisor gives them a
 * repair: the administrator is told how many open repairs are still the person's, and that number must be the
 * truth once both changes are in. On PostgreSQL the two run side by side: without a hold on the person's row, the
 * assignment read them as an active technician, the deactivation counted none of the new ticket, and the ticket
 * went to someone who can no longer sign in.
 */
let api: TestApi;
beforeAll(async () => {
  api = await startApi();
});
afterAll(() => api.close());

/** Pauses the first read of user `id` made inside a transaction until `release()`; `reached` resolves when it happens. */
const pauseReadOf = (id: number) => pauseFirstRead(User, 'pause-read-of-assignee', (result) => foundId(result, id));

describe('deactivating a technician while a repair is given to them', () => {
  it('tells the administrator the true number of open repairs still theirs', async () => {
    const fx = await supervisedRun(api, 'Deactivation race run');
    const finding = await confirmedFinding(api, fx.run.id, 70);
    const admin = await api.as('admin');
    const sup = await api.as('supervisor');
    const created = await admin.post('/api/users', { email: 'leaving.tech@example.com', name: 'Lior Leaving', role: 'technician' }).expect(201);
    const techId = created.body.user.id as number;

    const pause = pauseReadOf(techId);
    const assigning = sup.post('/api/tickets', { findingIds: [finding.id], assigneeId: techId, priority: 'normal' }).then((r) => r);
    await pause.reached;
    let deactivated: { status: number; body: { openTicketCount?: number } } | null = null;
    const deactivating = admin.patch(`/api/users/${techId}`, { active: false }).then((r) => (deactivated = r));
    // The deactivation either is done, or waits for the assignment's hold on the person's row.
    await eventually(async () => deactivated !== null || (await someoneWaitsForALock(api)), 'the deactivation to finish or wait');
    pause.release();
    const [ticket] = await Promise.all([assigning, deactivating]);

    expect(deactivated!.status).toBe(200);
    const user = (await User.findByPk(techId))!;
    expect(user.active).toBe(false);
    const stillTheirs = await Ticket.count({ where: { assigneeId: techId, status: [...OPEN_STATUSES] } });
    expect(deactivated!.body.openTicketCount).toBe(stillTheirs);
    if (ticket.status !== 201) expect(ticket.body.error.code).toBe('not_a_technician');
  });
});
