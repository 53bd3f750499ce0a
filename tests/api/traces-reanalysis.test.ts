import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { makeRun, stepTraceCsv } from './support/field-fixtures';
import { hashPassword } from '../../server/auth/passwords';
import { Trace, User } from '../../server/db/models';
import { analysisPool } from '../../server/traces/analysis-pool';
import { startApi, TEST_PASSWORD, type TestApi } from './support/api';

let api: TestApi;
let runId: number;
let cableTypeId: number;
beforeAll(async () => {
  api = await startApi();
  const { run, cable } = await makeRun('Re-analysis run');
  runId = run.id;
  cableTypeId = cable.id;
});
afterAll(() => api.close());

type Event = { isCableEnd: boolean; distanceM: number; roundTripNs: number };

describe('POST /api/traces/:id/reanalyse', () => {
  it('analyses the same stored bytes with the current library VF and keeps the earlier analysis as it was', async () => {
    const tech = await api.as('technician');
    // A 120 m cable that really propagates at VF 0.70, read first with the library's 0.66.
    const up = await tech
      .postRaw('/api/traces')
      .field('cableRunId', String(runId))
      .field('end', 'A')
      .attach('file', Buffer.from(stepTraceCsv({ faultM: 120, vf: 0.7 })), 'end-of-run.csv')
      .expect(201);
    const first = up.body.traces[0];
    const firstEnd = first.analysis.events.find((e: Event) => e.isCableEnd) as Event;
    expect(first.vf).toBe(0.66);

    const planner = await api.as('planner');
    await planner.patch(`/api/cables/${cableTypeId}`, { vf: 0.7, reason: 'field calibration on the 120 m drum' }).expect(200);
    const stale = await tech.get(`/api/traces/${first.id}`).expect(200);
    expect(stale.body.libraryChangedSince).toBe(true);
    expect(stale.body.reanalysedAs).toEqual([]);

    const res = await tech.post(`/api/traces/${first.id}/reanalyse`).expect(201);
    const again = res.body;
    expect(again.id).not.toBe(first.id);
    expect(again.reanalysisOfId).toBe(first.id);
    expect(again.sha256).toBe(first.sha256);
    expect(again.vf).toBe(0.7);
    expect(again.libraryChangedSince).toBe(false);
    const end = again.analysis.events.find((e: Event) => e.isCableEnd) as Event;
    // Same round trip, so the distance scales with the VF: d = VF·c·t/2 (the distance formula).
    expect(end.roundTripNs).toBeCloseTo(firstEnd.roundTripNs, 6);
    expect(end.distanceM).toBeCloseTo((firstEnd.distanceM * 0.7) / 0.66, 6);
    expect(end.distanceM).toBeGreaterThan(119.5);
    expect(end.distanceM).toBeLessThan(120.5);

    const earlier = await tech.get(`/api/traces/${first.id}`).expect(200);
    expect(earlier.body.vf).toBe(0.66);
    expect(earlier.body.reanalysedAs).toEqual([again.id]);
    const raw = await tech.get(`/api/traces/${again.id}/raw`).expect(200);
    expect(raw.headers['x-content-sha256']).toBe(first.sha256);
  });

  it('keeps the uploader as the owner, lets only them or a supervisor ask, returns the same re-analysis while nothing changed, and leaves archived traces alone', async () => {
    const tech = await api.as('technician');
    const up = await tech
      .postRaw('/api/traces')
      .field('cableRunId', String(runId))
      .field('end', 'B')
      .attach('file', Buffer.from(stepTraceCsv({ faultM: 80, vf: 0.7 })), 'owner-check.csv')
      .expect(201);
    const first = up.body.traces[0];

    // Another technician may not take over someone else's evidence by asking for a re-analysis.
    await User.create({ email: 'other.tech.reanalysis@example.com', name: 'Otto Other', role: 'technician', passwordHash: await hashPassword(TEST_PASSWORD) });
    const other = await api.signIn('other.tech.reanalysis@example.com', TEST_PASSWORD);
    const refused = await other.post(`/api/traces/${first.id}/reanalyse`).expect(403);
    expect(refused.body.error.code).toBe('not_your_trace');

    // A supervisor may; the new row is still the uploader's.
    const supervisor = await api.as('supervisor');
    const again = await supervisor.post(`/api/traces/${first.id}/reanalyse`).expect(201);
    expect(again.body.uploadedBy.id).toBe(first.uploadedBy.id);
    // Asked again with the same library values: the same re-analysis, no new row, from several at once too.
    const repeats = await Promise.all([0, 1, 2].map(() => tech.post(`/api/traces/${first.id}/reanalyse`).expect(200)));
    expect(repeats.map((r) => r.body.id)).toEqual([again.body.id, again.body.id, again.body.id]);
    const earlier = await tech.get(`/api/traces/${first.id}`).expect(200);
    expect(earlier.body.reanalysedAs).toEqual([again.body.id]);

    // An archived trace is not analysed again (that would bring it back into the lists).
    await tech.post(`/api/traces/${again.body.id}/archive`, { reason: 'duplicate of the first reading' }).expect(200);
    const archived = await supervisor.post(`/api/traces/${again.body.id}/reanalyse`).expect(409);
    expect(archived.body.error.code).toBe('trace_archived');
  });

  it('does not bring back a trace archived while its re-analysis was in the worker', async () => {
    const tech = await api.as('technician');
    const up = await tech
      .postRaw('/api/traces')
      .field('cableRunId', String(runId))
      .field('end', 'A')
      .attach('file', Buffer.from(stepTraceCsv({ faultM: 66, vf: 0.7 })), 'archived-mid-analysis.csv')
      .expect(201);
    const id = up.body.traces[0].id;
    const pool = analysisPool(api.app.ctx);
    const analyse = pool.analyse.bind(pool);
    // The uploader archives the trace as junk while a supervisor's re-analysis of it is in the worker.
    const spy = vi.spyOn(pool, 'analyse').mockImplementationOnce(async (job) => {
      const out = await analyse(job);
      await tech.post(`/api/traces/${id}/archive`, { reason: 'wrong pair on the set' }).expect(200);
      return out;
    });
    try {
      const supervisor = await api.as('supervisor');
      const res = await supervisor.post(`/api/traces/${id}/reanalyse`).expect(409);
      expect(res.body.error.code).toBe('trace_archived');
    } finally {
      spy.mockRestore();
    }
    expect(await Trace.count({ where: { reanalysisOfId: id } })).toBe(0);
    const earlier = await tech.get(`/api/traces/${id}`).expect(200);
    expect(earlier.body.reanalysedAs).toEqual([]);
  });

  it('answers 404 for an unknown trace', async () => {
    const tech = await api.as('technician');
    const res = await tech.post('/api/traces/424242/reanalyse').expect(404);
    expect(res.body.error.code).toBe('not_found');
  });
});
