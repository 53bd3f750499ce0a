import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { BestLocationView } from '../../shared/schemas/measurements';
import { startApi, type TestApi } from './support/api';
import { confirmedFinding, supervisedRun } from './tickets.support';

/**
 * One reading alone must give the same 95 % window as the engine's own: the engine states a
 * finding's uncertaintyM as the expanded half-width (k = 2, JCGM 100:2008 §6.2) and the VF
 * tolerance as a rectangular half-width (u = T/√3, §4.3.7); the fusion works in standard
 * uncertainties and expands by 1.96 (a normal distribution's 95 % factor). So the fused
 * half-width is 1.96/2 = 0.98 of the reading's, not about twice it.
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
    expect(fusedHalf / readingHalf).toBeCloseTo(0.98, 2);
  });
});
