import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CableReanalysisItem, Trace } from '../../server/db/models';
import { analysisPool, type AnalysisPool } from '../../server/traces/analysis-pool';
import type { CableReanalysisView } from '../../shared/schemas/cable-reanalysis';
import { makeRun, uploadStepTrace } from './support/field-fixtures';
import { startApi, type TestApi } from './support/api';
import { eventually } from './mail.support';

/**
 * A trace archived as junk while a re-analysis of its cable type is under way: the re-analysis must not bring it
 * back into the lists as a new, unarchived trace (as the re-analysis of one trace already refuses to).
 */
let api: TestApi;
beforeAll(async () => {
  api = await startApi({ jobs: { maintenanceSeconds: 1, pollSeconds: 0.5, leaseSeconds: 30, shutdownGraceMs: 2000 } });
});
afterAll(() => api?.close());

/** Holds every analysis of the background pool until `release()`; `reached` resolves when the first one is asked for. */
function holdBackground(pool: AnalysisPool) {
  const real = pool.analyse.bind(pool);
  let reached!: () => void;
  let release!: () => void;
  const reachedP = new Promise<void>((r) => (reached = r));
  const released = new Promise<void>((r) => (release = r));
  pool.analyse = async (...args: Parameters<AnalysisPool['analyse']>) => {
    reached();
    await released;
    return real(...args);
  };
  return { reached: reachedP, release: () => (Reflect.deleteProperty(pool, 'analyse'), release()) };
}

describe('a trace archived during its cable type’s re-analysis', () => {
  it('stays out of the lists: the re-analysis skips it and stores no new trace for it', async () => {
    const { run, cable } = await makeRun('Archive during reanalysis run');
    const tech = await api.as('technician');
    const planner = await api.as('planner');
    const { id: traceId } = await uploadStepTrace(tech, run.id, 80);
    await planner.patch(`/api/cables/${cable.id}`, { vf: 0.7, reason: 'Drum measured at the yard' }).expect(200);

    const hold = holdBackground(analysisPool(api.app.ctx, 'background'));
    const started = await planner.post(`/api/cables/${cable.id}/reanalyses`).expect(202);
    expect(started.body.traceTotal).toBe(1);
    await hold.reached;
    await tech.post(`/api/traces/${traceId}/archive`, { reason: 'Shot on the wrong pair' }).expect(200);
    hold.release();

    const done = await eventually(async () => {
      const r = (await planner.get(`/api/cables/${cable.id}/reanalyses/latest`).expect(200)).body.reanalysis as CableReanalysisView;
      return r.status === 'done' ? r : undefined;
    }, 'the re-analysis to finish', 60_000);
    expect(done).toMatchObject({ traceTotal: 1, tracesDone: 1, tracesOk: 0, tracesSkipped: 1 });
    expect(done.skipped[0]).toMatchObject({ traceId });
    expect(done.skipped[0].note).toMatch(/archived/);
    expect(await Trace.count({ where: { reanalysisOfId: traceId } })).toBe(0);
    const item = await CableReanalysisItem.findOne({ where: { traceId } });
    expect(item?.resultTraceId).toBeNull();
    const listed = await tech.get(`/api/traces?cableRunId=${run.id}`).expect(200);
    expect(listed.body.items.map((t: { id: number }) => t.id)).not.toContain(traceId);
    expect(listed.body.total).toBe(0);
  });
});
