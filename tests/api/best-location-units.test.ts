import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { BestLocationView } from '../../shared/schemas/measurements';
import { startApi, type TestApi } from './support/api';
import { confirmedFinding, supervisedRun } from './tickets.support';

/**
 * One reading alone must give the same 95 % window as the engine's own: the engine states a
 * finding's uncertaintyM as the expanded half-width (k = 2, JCGM 100:2008 §6.2) and the VF
 * tolerance as a rectangular half-width (u = T/√3, §4.3.7); the fusion works in standard
 * uncertainties and expands its window by the same k = 2. So the fused half-width is the
 * reading's own, not about twice it, nor 1.96/2 = 0.98 of it.
 */
let api: TestApi;
beforeAll(async () => {
  api = await startApi();
});
afterAll(() => api.close());

describe('a best location from one TDR reading', () => {
  it('keeps the reading’s own 95 % window, so the crew never sees two different windows for it', async () => {
    const fx = await supervisedRun(api, 'One reading run');
    const f = await confirmedFinding(api, fx.run.id, 120, 'A');
    const sup = await api.as('supervisor');
    const view = (await sup.get(`/api/findings/${f.id}`).expect(200)).body as { uncertaintyM: number; windowStartM: number; windowEndM: number; bestLocation: BestLocationView };
    const best = view.bestLocation;
    expect(best.distanceFromAM).toBeCloseTo(f.distanceM, 6);
    expect(best.standardUncertaintyM).toBeCloseTo(view.uncertaintyM / 2, 6);
    const readingHalf = (view.windowEndM - view.windowStartM) / 2;
    const fusedHalf = (best.windowEndM! - best.windowStartM!) / 2;
    expect(fusedHalf / readingHalf).toBeCloseTo(1, 6);
    expect(best.windowStartM!).toBeCloseTo(view.windowStartM, 6);
    expect(best.windowEndM!).toBeCloseTo(view.windowEndM, 6);
  });
});

describe('a second reading of a fault already on a ticket', () => {
  it('shows that ticket on its finding and is not listed as needing one', async () => {
    const fx = await supervisedRun(api, 'Same fault run');
    const sup = await api.as('supervisor');
    // The open at 150 m of cable from end A, read once from each end (the run is 200 m: 50 m from B).
    const fromA = await confirmedFinding(api, fx.run.id, 150, 'A');
    const ticket = (await sup.post('/api/tickets', { findingIds: [fromA.id], title: 'Open on the same-fault run' }).expect(201)).body as { id: number };
    const fromB = await confirmedFinding(api, fx.run.id, 50, 'B');
    const view = (await sup.get(`/api/findings/${fromB.id}`).expect(200)).body as { tickets: Array<{ id: number }> };
    expect(view.tickets.map((t) => t.id)).toEqual([ticket.id]);
    const dash = (await sup.get('/api/dashboard').expect(200)).body as { unticketed: Array<{ id: number }> };
    expect(dash.unticketed.map((f) => f.id)).not.toContain(fromB.id);
    // A fault elsewhere on the run still needs its own ticket.
    const elsewhere = await confirmedFinding(api, fx.run.id, 40, 'A');
    expect(((await sup.get(`/api/findings/${elsewhere.id}`).expect(200)).body as { tickets: unknown[] }).tickets).toEqual([]);
    expect(((await sup.get('/api/dashboard').expect(200)).body as { unticketed: Array<{ id: number }> }).unticketed.map((f) => f.id)).toContain(elsewhere.id);
  });
});

