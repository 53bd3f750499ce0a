import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { DashboardView, TicketDetail } from '../../shared/schemas/tickets';
import { startApi, type TestApi } from './support/api';
import { confirmedFinding, supervisedRun } from './tickets.support';

let api: TestApi;
beforeAll(async () => {
  api = await startApi();
});
afterAll(() => api?.close());

describe('GET /api/dashboard', () => {
  it('counts open tickets by age and priority, lists unticketed findings and the located-vs-found accuracy per cable type', async () => {
    const fx = await supervisedRun(api, 'Dashboard run');
    const sup = await api.as('supervisor');
    const tech = await api.as('technician');
    const f1 = await confirmedFinding(api, fx.run.id, 100);
    const f2 = await confirmedFinding(api, fx.run.id, 150);
    const f3 = await confirmedFinding(api, fx.run.id, 50);

    let d = (await sup.get('/api/dashboard').expect(200)).body as DashboardView;
    expect(d.unticketed.map((f) => f.id).sort()).toEqual([f1.id, f2.id, f3.id].sort());
    expect(d.accuracy).toEqual([]);
    expect([d.openCount, d.awaitingSignOff]).toEqual([0, 0]);

    const t1 = (await sup.post('/api/tickets', { findingIds: [f1.id], assigneeId: api.users.technician.id, priority: 'urgent' }).expect(201)).body as TicketDetail;
    const t2 = (await sup.post('/api/tickets', { findingIds: [f2.id], assigneeId: api.users.technician.id, priority: 'low' }).expect(201)).body as TicketDetail;
    // Found 4 m of cable further out than each reading: errors are exactly −4 m each.
    await tech.post(`/api/tickets/${t1.id}/closeout`, { found: { method: 'distance', fromEnd: 'A', distanceM: f1.distanceM + 4 }, cause: 'open-conductor', workDone: 'Joint' }).expect(200);
    await tech.post(`/api/tickets/${t2.id}/closeout`, { found: { method: 'distance', fromEnd: 'A', distanceM: f2.distanceM + 4 }, cause: 'open-conductor', workDone: 'Joint' }).expect(200);

    d = (await (await api.as('planner')).get('/api/dashboard').expect(200)).body as DashboardView;
    expect(d.unticketed.map((f) => f.id)).toEqual([f3.id]);
    expect(d.openCount).toBe(2);
    // Both are closed out: fixed, and waiting for a supervisor's sign-off rather than a crew.
    expect(d.awaitingSignOff).toBe(2);
    expect(d.byAge[0].label).toBe('Under a day');
    expect(d.byAge[0].counts).toEqual({ urgent: 1, high: 0, normal: 0, low: 1 });
    expect(d.byAge.slice(1).every((b) => Object.values(b.counts).every((n) => n === 0))).toBe(true);
    expect(d.accuracy).toHaveLength(1);
    const a = d.accuracy[0];
    expect(a.cableType.id).toBe(fx.cable.id);
    expect(a.count).toBe(2);
    expect(a.meanErrorM).toBeCloseTo(-4, 9);
    expect(a.meanAbsErrorM).toBeCloseTo(4, 9);
    // Hand-worked: mean of 4/(d1 + 4) and 4/(d2 + 4), as percentages.
    expect(a.meanAbsErrorPercent).toBeCloseTo((100 * (4 / (f1.distanceM + 4)) + 100 * (4 / (f2.distanceM + 4))) / 2, 9);
    expect(a.libraryVf).toBe(0.66);
    // Both found further out than located: the implied VF is above the 0.66 the traces were made with.
    expect(a.meanImpliedVf!).toBeGreaterThan(0.66);

    await (await api.as('technician')).get('/api/dashboard').expect(403);
  });
});
