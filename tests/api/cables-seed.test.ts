import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_CABLE_TYPE_NAMES } from '../../server/db/demo/cables';
import { startApi, type TestApi } from './support/api';

let api: TestApi;
beforeAll(async () => {
  api = await startApi({ demoData: true });
});
afterAll(() => api.close());

/**
 * Handbook ranges of VF per dielectric family: solid PE ≈ 0.66, PTFE 0.69–0.70, PVC 0.45–0.53
 * (Standard Wire & Cable dielectric table; NA5N coax data sheet), foam PE 0.78–0.88 (NA5N foam rows
 * 0.78–0.84, upper end common practice); telephone and data pairs, MV and paper cables from memory of
 * TDR practice (the seed says so in its references).
 */
const RANGES: Record<string, [number, number]> = {
  'Solid PE coax, 50 Ω': [0.65, 0.67],
  'Solid PE coax, 75 Ω': [0.65, 0.67],
  'Foam PE coax, 75 Ω': [0.78, 0.88],
  'Foam PE coax, 50 Ω': [0.78, 0.88],
  'PTFE coax, 50 Ω': [0.69, 0.7],
  'PVC-insulated pair': [0.45, 0.6],
  'PE-insulated telephone pair': [0.64, 0.68],
  'Jelly-filled telephone pair': [0.62, 0.66],
  'Data-grade twisted pair, 100 Ω': [0.65, 0.7],
  'Shielded XLPE MV cable': [0.5, 0.67],
  'Shielded EPR MV cable': [0.5, 0.62],
  'Paper-insulated lead-covered cable': [0.5, 0.56],
};

describe('the demo cable library', () => {
  it('holds the generic dielectric families with VFs inside their handbook ranges', async () => {
    const c = await api.as('technician');
    const res = await c.get('/api/cables?pageSize=100').expect(200);
    const names = res.body.items.map((i: { name: string }) => i.name).sort();
    expect(names).toEqual([...DEMO_CABLE_TYPE_NAMES].sort());
    expect(Object.keys(RANGES).sort()).toEqual(names);
    for (const item of res.body.items as Array<{ name: string; vf: number; vfTolerance: number; vfReference: string }>) {
      const [lo, hi] = RANGES[item.name];
      expect(item.vf, item.name).toBeGreaterThanOrEqual(lo);
      expect(item.vf, item.name).toBeLessThanOrEqual(hi);
      // The tolerance band should cover the range's half-width, give or take rounding.
      expect(item.vf * item.vfTolerance, item.name).toBeGreaterThanOrEqual((hi - lo) / 2 - 0.011);
      expect(item.vfReference.length, item.name).toBeGreaterThan(20);
    }
    const h = await c.get(`/api/cables/${res.body.items[0].id}/history`).expect(200);
    expect(h.body).toHaveLength(1);
    expect(h.body[0]).toMatchObject({ kind: 'create', revision: 1, changedBy: null });
  });

  it('names no brands or products', () => {
    // Common trade marks and cable part-number prefixes; the generic families must not use them.
    for (const n of DEMO_CABLE_TYPE_NAMES) expect(n).not.toMatch(/\b(RG|LMR|Belden|Teflon|Heliax|CAT ?\d)/i);
  });
});
