import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeRun, stepTraceCsv } from './support/field-fixtures';
import { startApi, type TestApi } from './support/api';

let api: TestApi;
let runId: number;
let cableTypeId: number;
beforeAll(async () => {
  api = await startApi();
  const { run, cable } = await makeRun('Calibration run');
  runId = run.id;
  cableTypeId = cable.id;
});
afterAll(() => api.close());

const upload = async (faultM: number, vf: number, name: string) => {
  const tech = await api.as('technician');
  const res = await tech
    .postRaw('/api/traces')
    .field('cableRunId', String(runId))
    .field('end', 'A')
    // The name goes into a comment line so that two recordings of the same cable are not the same bytes.
    .attach('file', Buffer.from(`# recording ${name}\n${stepTraceCsv({ faultM, vf })}`), name)
    .expect(201);
  return res.body.traces[0];
};

describe('a field calibration, once accepted, is what the next analysis uses', () => {
  it('takes the end reflection of a trace, goes through review and changes the distances', async () => {
    // The cable really propagates at VF 0.70 and is 100 m long; the library says 0.66 (the fixture's
    // handbook value for solid PE). The file's round trip is t = 2·100/(0.70·c) = 953.0 ns (from the formula).
    const first = await upload(100, 0.7, 'before.csv');
    expect(first.vf).toBe(0.66);
    const end = first.analysis.events.find((e: { isCableEnd: boolean }) => e.isCableEnd);
    // At the library's 0.66 it reads short: 100 · 0.66/0.70 = 94.3 m.
    expect(end.distanceM).toBeGreaterThan(93.3);
    expect(end.distanceM).toBeLessThan(95.3);

    const tech = await api.as('technician');
    const cal = await tech
      .post('/api/calibrations', { cableTypeId, knownLengthM: 100, roundTripNs: end.roundTripNs, source: 'trace', traceId: first.id })
      .expect(201);
    // The engine finds the edge to within a sample or two (1 ns here): VF within about ±0.2 % of 0.70.
    expect(cal.body.vf).toBeGreaterThan(0.698);
    expect(cal.body.vf).toBeLessThan(0.702);
    expect(cal.body.traceId).toBe(first.id);

    const planner = await api.as('planner');
    const accepted = await planner.post(`/api/calibrations/${cal.body.id}/accept`, {}).expect(200);
    expect(accepted.body.cable.vf).toBeCloseTo(cal.body.vf, 4);

    const second = await upload(100, 0.7, 'after.csv');
    expect(second.vf).toBeCloseTo(cal.body.vf, 4);
    const end2 = second.analysis.events.find((e: { isCableEnd: boolean }) => e.isCableEnd);
    expect(end2.distanceM).toBeGreaterThan(99.5);
    expect(end2.distanceM).toBeLessThan(100.5);

    // The earlier trace keeps the VF it was analysed with and says the library has changed since.
    const again = await tech.get(`/api/traces/${first.id}`).expect(200);
    expect(again.body.vf).toBe(0.66);
    expect(again.body.libraryChangedSince).toBe(true);
    const latest = await tech.get(`/api/traces/${second.id}`).expect(200);
    expect(latest.body.libraryChangedSince).toBe(false);
  });
});
