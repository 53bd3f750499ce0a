import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CableReanalysis, CableReanalysisItem, CableType, Trace } from '../../server/db/models';
import type { CableReanalysisView } from '../../shared/schemas/cable-reanalysis';
import { makeRun, stepTraceCsv } from './support/field-fixtures';
import { startApi, type Client, type TestApi } from './support/api';
import { eventually } from './mail.support';

let api: TestApi;
let planner: Client;
let cableId: number;
const traceIds: number[] = [];

beforeAll(async () => {
  api = await startApi({ jobs: { maintenanceSeconds: 1, pollSeconds: 0.5, leaseSeconds: 30, shutdownGraceMs: 2000 } });
  const { run, cable } = await makeRun('Library changed mid re-analysis');
  cableId = cable.id;
  const tech = await api.as('technician');
  planner = await api.as('planner');
  for (const faultM of [100, 150]) {
    const csv = Buffer.from(stepTraceCsv({ faultM, vf: 0.66 }), 'utf8');
    const res = await tech.postRaw('/api/traces').field('cableRunId', String(run.id)).field('end', 'A').attach('file', csv, `open-${faultM}.csv`).expect(201);
    traceIds.push(res.body.traces[0].id);
  }
});
afterAll(() => api?.close());

async function latest(): Promise<CableReanalysisView> {
  return (await planner.get(`/api/cables/${cableId}/reanalyses/latest`).expect(200)).body.reanalysis;
}

describe('a cable re-analysis whose cable type changes before its steps run', () => {
  it('analyses nothing with values other than those it started with, says why, and a new run takes the traces', async () => {
    await planner.patch(`/api/cables/${cableId}`, { vf: 0.7, reason: 'Drum measured at the yard' }).expect(200);
    const started = (await CableType.findByPk(cableId))!;
    // A run started at VF 0.70 whose steps have not run yet (queued behind other work) …
    const run = await CableReanalysis.create({
      cableTypeId: cableId,
      cableTypeRevision: started.revision,
      vf: 0.7,
      requestedById: api.users.planner.id,
      status: 'running',
      traceTotal: traceIds.length,
      traceIds,
    });
    // … when another planner changes the VF again.
    await planner.patch(`/api/cables/${cableId}`, { vf: 0.72, reason: 'Second drum' }).expect(200);
    await api.app.ctx.jobs.send('cable-reanalysis', { reanalysisId: run.id, traceIds });
    await eventually(async () => (await CableReanalysis.findByPk(run.id))!.status === 'done', 'the run to finish', 60_000);
    const items = await CableReanalysisItem.findAll({ where: { reanalysisId: run.id }, order: [['traceId', 'ASC']] });
    expect(items.map((i) => i.outcome)).toEqual(['skipped', 'skipped']);
    expect(items[0].note).toBe(
      `the cable type was changed (revision ${started.revision + 1}, VF 0.72) after this re-analysis started with revision ${started.revision} (VF 0.7): start a new re-analysis`,
    );
    for (const id of traceIds) expect(await Trace.count({ where: { reanalysisOfId: id } })).toBe(0);
    expect(await latest()).toMatchObject({ id: run.id, vf: 0.7, traceTotal: 2, tracesDone: 2, tracesOk: 0, tracesSkipped: 2 });

    // The next run covers both traces with the library's values of now.
    const again = (await planner.post(`/api/cables/${cableId}/reanalyses`).expect(202)).body as CableReanalysisView;
    expect(again).toMatchObject({ traceTotal: 2, vf: 0.72 });
    const done = await eventually(async () => {
      const r = await latest();
      return r.id === again.id && r.status === 'done' ? r : undefined;
    }, 'the new run to finish', 60_000);
    expect(done).toMatchObject({ tracesDone: 2, tracesOk: 2, tracesSkipped: 0 });
    for (const id of traceIds) {
      const made = await Trace.findAll({ where: { reanalysisOfId: id } });
      expect(made.map((t) => t.vf)).toEqual([0.72]);
    }
  });
});
