import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ROLES } from '../../shared/auth/permissions';
import { cableTypeVersion } from '../../server/cables/cables.service';
import { solidPePair } from './support/cables';
import { startApi, type Client, type TestApi } from './support/api';

let api: TestApi;
let planner: Client;
let tech: Client;
let cableId: number;

const C = 299_792_458; // m/s, exact (SI definition of the metre)
/** The round-trip time in ns of a known length at a VF: t = 2L/(VF·c). */
const roundTripNs = (lengthM: number, vf: number) => ((2 * lengthM) / (vf * C)) * 1e9;

beforeAll(async () => {
  api = await startApi();
  planner = await api.as('planner');
  tech = await api.as('technician');
  const res = await planner.post('/api/cables', solidPePair('Calibrated PE pair')).expect(201);
  cableId = res.body.id;
});
afterAll(() => api.close());

describe('POST /api/calibrations', () => {
  it('computes VF = 2L/(c·t) from the technician’s known length and queues it', async () => {
    const res = await tech
      .post('/api/calibrations', {
        cableTypeId: cableId,
        knownLengthM: 250,
        roundTripNs: roundTripNs(250, 0.645),
        note: 'As-built 250 m',
      })
      .expect(201);
    expect(res.body.vf).toBeCloseTo(0.645, 9);
    expect(res.body).toMatchObject({
      status: 'pending',
      source: 'manual',
      libraryVf: 0.66,
      cableType: { id: cableId, name: 'Calibrated PE pair' },
    });
    expect(res.body.deviation).toBeCloseTo((0.645 - 0.66) / 0.66, 9);
    const mine = await tech.get('/api/calibrations/mine').expect(200);
    expect(mine.body.items.map((i: { id: number }) => i.id)).toContain(res.body.id);
  });

  it('rejects bad numbers with field messages and a faster-than-light result with 422', async () => {
    const missing = await tech.post('/api/calibrations', { cableTypeId: cableId, roundTripNs: 1000 }).expect(400);
    expect(missing.body.error.fields).toEqual([{ field: 'knownLengthM', message: 'is required: a number of metres' }]);
    const negative = await tech
      .post('/api/calibrations', { cableTypeId: cableId, knownLengthM: 100, roundTripNs: -5 })
      .expect(400);
    expect(negative.body.error.fields[0]).toEqual({ field: 'roundTripNs', message: 'must be greater than 0 ns' });
    // 200 m in 1000 ns there and back would be 400 m/µs = 1.33 c.
    const fast = await tech.post('/api/calibrations', { cableTypeId: cableId, knownLengthM: 200, roundTripNs: 1000 }).expect(422);
    expect(fast.body.error.code).toBe('vf_not_physical');
    expect(fast.body.error.fields[0].field).toBe('roundTripNs');
    const ghost = await tech.post('/api/calibrations', { cableTypeId: 987654, knownLengthM: 100, roundTripNs: 1000 }).expect(422);
    expect(ghost.body.error.fields).toEqual([{ field: 'cableTypeId', message: 'is not a cable type in the library' }]);
    // A calibration may name the trace it was read from; one that does not exist is refused, not stored as a dangling link.
    const noTrace = await tech
      .post('/api/calibrations', {
        cableTypeId: cableId,
        knownLengthM: 250,
        roundTripNs: roundTripNs(250, 0.645),
        traceId: 99999,
      })
      .expect(422);
    expect(noTrace.body.error).toMatchObject({
      code: 'unknown_trace',
      fields: [{ field: 'traceId', message: 'is not a stored trace' }],
    });
  });

  it('is open to every role that may submit, and the queue only to reviewers', async () => {
    for (const role of ROLES) {
      const c = await api.as(role);
      const res = await c.post('/api/calibrations', {
        cableTypeId: cableId,
        knownLengthM: 100,
        roundTripNs: roundTripNs(100, 0.65),
      });
      expect(res.status).toBe(201);
      const queue = await c.get('/api/calibrations');
      expect(queue.status).toBe(role === 'planner' || role === 'admin' ? 200 : 403);
    }
    await tech.post('/api/calibrations/1/accept', {}).expect(403);
  });
});

describe('the review queue', () => {
  it('accepts one into the library with history, so the next analysis uses the new VF', async () => {
    const { body: cal } = await tech
      .post('/api/calibrations', { cableTypeId: cableId, knownLengthM: 412.5, roundTripNs: roundTripNs(412.5, 0.6437) })
      .expect(201);
    const before = await cableTypeVersion(cableId);

    const queue = await planner.get('/api/calibrations?status=pending&pageSize=100').expect(200);
    const queued = queue.body.items.find((i: { id: number }) => i.id === cal.id);
    // The reviewer sees both the library value at submission and the value now.
    expect(queued.cableType.currentVf).toBe(before.vf);
    expect(queued.libraryVf).toBe(before.vf);
    // The reference written into the library is rounded for people, not a float dump.
    expect(cal.roundTripNs.toFixed(2)).not.toBe(String(cal.roundTripNs));

    const res = await planner.post(`/api/calibrations/${cal.id}/accept`, { note: 'matches the as-built' }).expect(200);
    expect(res.body.calibration).toMatchObject({
      status: 'accepted',
      reviewedBy: { name: 'Pat Plan' },
      reviewReason: 'matches the as-built',
    });
    expect(res.body.cable).toMatchObject({ vf: 0.6437, vfSource: 'field-calibrated', revision: before.revision + 1 });
    expect(res.body.cable.vfReference).toContain(
      `Field calibration #${cal.id}: 412.5 m known length, ${Number(cal.roundTripNs.toFixed(2))} ns round trip`,
    );
    // Dated as every screen and e-mail dates things ("3 Dec 2026"), not in ISO form.
    expect(res.body.cable.vfReference).toMatch(/, submitted by [^,]+ on \d{1,2} [A-Z][a-z]{2} \d{4}\.$/);

    const after = await cableTypeVersion(cableId);
    expect(after.vf).toBe(0.6437);
    expect(after.revision).toBe(before.revision + 1);

    const h = await planner.get(`/api/cables/${cableId}/history`).expect(200);
    expect(h.body[0]).toMatchObject({
      kind: 'calibration',
      calibrationId: cal.id,
      reason: `Accepted field calibration #${cal.id}: matches the as-built`,
    });
    expect(h.body[0].changes[0]).toEqual({ field: 'vf', from: before.vf, to: 0.6437 });

    const again = await planner.post(`/api/calibrations/${cal.id}/accept`, {}).expect(409);
    expect(again.body.error.code).toBe('already_reviewed');
  });

  it('rejects one with a reason and leaves the library alone', async () => {
    const { body: cal } = await tech
      .post('/api/calibrations', { cableTypeId: cableId, knownLengthM: 80, roundTripNs: roundTripNs(80, 0.5) })
      .expect(201);
    const before = await cableTypeVersion(cableId);
    const noReason = await planner.post(`/api/calibrations/${cal.id}/reject`, {}).expect(400);
    expect(noReason.body.error.fields[0].field).toBe('reason');
    const res = await planner
      .post(`/api/calibrations/${cal.id}/reject`, { reason: 'Length was to the wrong splice' })
      .expect(200);
    expect(res.body).toMatchObject({ status: 'rejected', reviewReason: 'Length was to the wrong splice' });
    expect(await cableTypeVersion(cableId)).toEqual(before);
    const rejected = await planner.get('/api/calibrations?status=rejected').expect(200);
    expect(rejected.body.items[0].id).toBe(cal.id);
  });

  it('gives per-cable statistics over the calibrations not rejected', async () => {
    const res = await tech.get(`/api/cables/${cableId}/calibrations`).expect(200);
    const kept = res.body.items
      .filter((i: { status: string }) => i.status !== 'rejected')
      .map((i: { vf: number }) => i.vf) as number[];
    const mean = kept.reduce((a, b) => a + b, 0) / kept.length;
    const sd = Math.sqrt(kept.reduce((a, v) => a + (v - mean) ** 2, 0) / (kept.length - 1));
    expect(res.body.stats.count).toBe(kept.length);
    expect(res.body.stats.mean).toBeCloseTo(mean, 12);
    expect(res.body.stats.stdDev).toBeCloseTo(sd, 12);
    expect(res.body.counts).toMatchObject({ accepted: 1, rejected: 1 });
    expect(res.body.acceptedStats).toMatchObject({ count: 1, mean: expect.closeTo(0.6437, 9) });
    expect(res.body.libraryVf).toBe(0.6437);
  });
});
