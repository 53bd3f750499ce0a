import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startApi, type Client, type TestApi } from './support/api';
import { supervisedRun } from './tickets.support';

// Readings near the largest double (1e308) overflowed inside the location formulas: two ratio arms
// of 1e308 Ω summed to Infinity and the answer blamed a "ratio … got 0" nobody sent; two capacitances
// of 1e308 F put the fault "NaN m from end A". Bounds (common practice): lengths at most 100 km as
// everywhere in Rholog (docs/api.md), resistances at most 1 TΩ (the top of insulation testers'
// ranges), capacitances at most 1 mF (a 100 km cable at 100 pF/m holds 10 µF).

let api: TestApi;
let tech: Client;
let runId: number;
const section = [{ lengthM: 200, material: 'copper', sizeMm2: 1.5 }];

beforeAll(async () => {
  api = await startApi();
  tech = await api.as('technician');
  runId = (await supervisedRun(api, 'Bounds')).run.id;
});
afterAll(() => api.close());

const record = (kind: string, readings: object) => tech.post('/api/measurements', { cableRunId: runId, kind, readings, instrument: 'Bridge B-2' });

async function refused(kind: string, readings: object, fields: string[], message: string) {
  const res = await record(kind, readings).expect(400);
  expect(res.body.error.code).toBe('invalid_input');
  expect(res.body.error.fields).toEqual(fields.map((field) => ({ field, message })));
  expect(res.body.error.message).not.toMatch(/NaN|Infinity/);
}

describe('bridge, capacitance and resistance readings are bounded', () => {
  it('refuses a reading too large to be real, naming the field that holds it', async () => {
    await refused('murray', { fromEnd: 'A', faulty: section, sound: 'same', faultySideArmOhm: 1e308, soundSideArmOhm: 1e308 }, ['readings.faultySideArmOhm', 'readings.soundSideArmOhm'], 'must be at most 1e12 Ω (1 TΩ)');
    await refused('capacitance', { fromEnd: 'A', measuredF: 1e308, otherEndF: 2e-9 }, ['readings.measuredF'], 'must be at most 0.001 F (1 mF)');
    await refused('capacitance', { fromEnd: 'A', measuredF: 1e-9, otherEndF: 1e308 }, ['readings.otherEndF'], 'must be at most 0.001 F (1 mF)');
    await refused('loop-resistance', { fromEnd: 'A', loopOhm: 1, first: [{ lengthM: 1e308, material: 'copper', sizeMm2: 1.5 }] }, ['readings.first.0.lengthM'], 'must be at most 100000 m');
    await refused('varley', { fromEnd: 'A', faulty: section, sound: 'same', armRatio: 1e308, rheostatOhm: 1 }, ['readings.armRatio'], 'must be at most 1000000 (a/b)');
    await refused('murray', { fromEnd: 'A', faulty: section, sound: 'same', ratio: 0.3, ratioStep: 1e300 }, ['readings.ratioStep'], 'must be at most 1 (a share of the loop)');
    const list = await tech.get(`/api/measurements?cableRunId=${runId}&all=true`).expect(200);
    expect(list.body).toHaveLength(0);
  });

  it('still takes readings at the ends of the ranges', async () => {
    // Murray loop on a looped pair (sound = faulty): the fault is at 2·L·Q/(P+Q) of the loop, so equal
    // arms put it at the far end of a 200 m run; with Q/(P+Q) = 0.3 at 0.6 · 200 = 120 m (the Murray
    // formula as in V. K. Mehta, Principles of Power System).
    const arms = await record('murray', { fromEnd: 'A', faulty: section, sound: 'same', faultySideArmOhm: 3e11, soundSideArmOhm: 7e11 }).expect(201);
    expect(arms.body.estimate.distanceFromEndM).toBeCloseTo(120, 6);
    // Capacitance from both ends: d = L · Cx / (Cx + Cy) = 200 · 1 / (1 + 3) = 50 m.
    const cap = await record('capacitance', { fromEnd: 'A', measuredF: 1e-3 / 4, otherEndF: 3e-3 / 4 }).expect(201);
    expect(cap.body.estimate.distanceFromEndM).toBeCloseTo(50, 6);
  });
});
