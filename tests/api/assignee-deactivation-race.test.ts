import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { QueryTypes } from 'sequelize';
import { Ticket, User } from '../../server/db/models';
import { OPEN_STATUSES } from '../../shared/tickets/status';
import { isPostgres, startApi, type TestApi } from './support/api';
import { eventually } from './mail.support';
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
function pauseReadOf(id: number) {
  let reached!: () => void;
  let release!: () => void;
  const reachedP = new Promise<void>((r) => (reached = r));
  const released = new Promise<void>((r) => (release = r));
  let armed = true;
  User.addHook('afterFind', 'pause-read-of-assignee', async (result: unknown, options: { transaction?: unknown }) => {
    const rows = Array.isArray(result) ? result : [result];
    if (!armed || !options.transaction || !rows.some((u) => (u as User | null)?.id === id)) return;
    armed = false;
    reached();
    await released;
  });
  return {
    reached: reachedP,
    release: () => {
      User.removeHook('afterFind', 'pause-read-of-assignee');
      release();
    },
  };
}

/** True once a database session waits for a row lock (PostgreSQL); SQLite runs one write transaction at a time anyway. */
async function someoneWaitsForALock() {
  if (!isPostgres) return true;
  const [row] = await api.app.ctx.sequelize.query<{ n: string }>(
    "SELECT count(*) AS n FROM pg_stat_activity WHERE datname = current_database() AND wait_event_type = 'Lock'",
    { type: QueryTypes.SELECT },
  );
  return Number(row.n) > 0;
}

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
    await eventually(async () => deactivated !== null || (await someoneWaitsForALock()), 'the deactivation to finish or wait');
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
