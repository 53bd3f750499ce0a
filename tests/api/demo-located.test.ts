import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CableRun, Finding, Measurement, Ticket, TicketFinding } from '../../server/db/models';
import type { BestLocationView } from '../../shared/schemas/measurements';
import { startApi, type TestApi } from './support/api';

let api: TestApi;

beforeAll(async () => {
  api = await startApi({ demoData: true });
});
afterAll(() => api?.close());

describe('the demo fault located three ways', () => {
  it('gives Feeder HN-3 one best location from two traces and a Murray reading, narrower than either trace alone', async () => {
    const run = (await CableRun.findOne({ where: { name: 'Feeder HN-3 to Ashby Lane' } }))!;
    const findings = await Finding.findAll({ where: { cableRunId: run.id, status: 'confirmed' }, order: [['id', 'ASC']] });
    expect(findings).toHaveLength(2);
    expect(await Measurement.count({ where: { cableRunId: run.id, kind: 'murray', status: 'active' } })).toBe(1);
    const planner = await api.as('planner');
    const best = (await planner.get(`/api/findings/${findings[0].id}`).expect(200)).body.bestLocation as BestLocationView;
    expect(best.consistent).toBe(true);
    expect(best.methods.filter((m) => m.used).map((m) => m.method).sort()).toEqual(['murray-loop', 'tdr-two-ended']);
    // The simulator put the fault 612 m from end A (scripts/make-demo-traces.ts); the Murray balance 0.340 of a
    // 2 × 900 m loop says 612 m too (hand-worked). The fused window holds it.
    expect(best.windowStartM!).toBeLessThan(612);
    expect(best.windowEndM!).toBeGreaterThan(612);
    const width = best.windowEndM! - best.windowStartM!;
    const singles = best.methods.filter((m) => m.method === 'tdr-single-ended');
    expect(singles).toHaveLength(2);
    for (const s of singles) expect(width).toBeLessThan((s.windowEndM - s.windowStartM) / 3);
    // Its repair ticket holds both findings of the fault.
    const links = await TicketFinding.findAll({ where: { findingId: findings.map((f) => f.id) } });
    expect(new Set(links.map((l) => l.ticketId)).size).toBe(1);
    expect((await Ticket.findByPk(links[0].ticketId))!.status).toBe('assigned');
  });
});
