import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CableReanalysis, CableReanalysisItem, Trace } from '../../server/db/models';
import { findingShifts, registerCableReanalysis } from '../../server/jobs/cable-reanalysis';
import type { CableReanalysisView } from '../../shared/schemas/cable-reanalysis';
import { makeRun, stepTraceCsv } from './support/field-fixtures';
import { startApi, type Client, type TestApi } from './support/api';
import { eventually } from './mail.support';

let api: TestApi;
let tech: Client;
let planner: Client;
let cableId: number;
const traceIds: number[] = [];
const FAULTS_M = [100, 60, 150];

async function latest(): Promise<CableReanalysisView> {
  return (await planner.get(`/api/cables/${cableId}/reanalyses/latest`).expect(200)).body.reanalysis;
}

beforeAll(async () => {
  api = await startApi({ jobs: { maintenanceSeconds: 1, pollSeconds: 0.5, leaseSeconds: 30, shutdownGraceMs: 2000 } });
  const { run, cable } = await makeRun();
  cableId = cable.id;
  tech = await api.as('technician');
  planner = await api.as('planner');
  for (const faultM of FAULTS_M) {
    const csv = Buffer.from(stepTraceCsv({ faultM, vf: 0.66 }), 'utf8');
    const res = await tech.postRaw('/api/traces').field('cableRunId', String(run.id)).field('end', 'A').attach('file', csv, `open-${faultM}.csv`).expect(201);
    const t = res.body.traces[0];
    traceIds.push(t.id);
    const index = t.analysis.events.findIndex((e: { type: string }) => e.type === 'open');
    await tech.post('/api/findings', { traceId: t.id, eventIndex: index, status: 'confirmed', kind: 'open-conductor' }).expect(201);
  }
});
afterAll(() => api?.close());

describe('re-analysis of every trace of a cable type', () => {
  it('says there is none yet, and refuses a technician', async () => {
    expect(await latest()).toBeNull();
    await tech.post(`/api/cables/${cableId}/reanalyses`).expect(403);
    expect((await planner.get('/api/cables/999999/reanalyses/latest').expect(404)).body.error.code).toBe('not_found');
  });

  it('analyses each trace once with the new VF and reports how far its findings moved', async () => {
    await planner.patch(`/api/cables/${cableId}`, { vf: 0.7, reason: 'Drum measured at the yard' }).expect(200);
    const started = await planner.post(`/api/cables/${cableId}/reanalyses`).expect(202);
    expect(started.body.traceTotal).toBe(3);
    expect(started.body.vf).toBe(0.7);
    const done = await eventually(async () => {
      const r = await latest();
      return r.status === 'done' ? r : undefined;
    }, 'the re-analysis to finish', 60_000);
    expect(done).toMatchObject({ traceTotal: 3, tracesDone: 3, tracesOk: 3, tracesFailed: 0, tracesSkipped: 0, findings: 3, findingsMoved: 3, findingsUnmatched: 0 });
    // d = VF·c·t/2 (the propagation formula): the same round-trip time read with VF 0.70 instead of 0.66
    // places each open d·(0.70/0.66 − 1) further: 6.06, 3.64 and 9.09 m (hand-worked), mean 6.26 m.
    expect(done.maxShiftM).toBeGreaterThan(9.09 - 0.5);
    expect(done.maxShiftM).toBeLessThan(9.09 + 0.5);
    expect(done.meanShiftM).toBeGreaterThan(6.26 - 0.5);
    expect(done.meanShiftM).toBeLessThan(6.26 + 0.5);
    expect(done.finishedAt).not.toBeNull();
    for (const id of traceIds) {
      const again = await Trace.findAll({ where: { reanalysisOfId: id } });
      expect(again).toHaveLength(1);
      expect(again[0].vf).toBe(0.7);
    }
  });

  it('has nothing left to do when started again with the same library values', async () => {
    const res = await planner.post(`/api/cables/${cableId}/reanalyses`).expect(202);
    expect(res.body).toMatchObject({ status: 'done', traceTotal: 0, tracesDone: 0, findings: 0 });
  });

  it('refuses a second run while one is running', async () => {
    const running = await CableReanalysis.create({ cableTypeId: cableId, cableTypeRevision: 1, vf: 0.7, requestedById: api.users.planner.id, status: 'running', traceTotal: 1, traceIds: [] });
    try {
      const res = await planner.post(`/api/cables/${cableId}/reanalyses`).expect(409);
      expect(res.body.error.code).toBe('reanalysis_running');
    } finally {
      await running.destroy();
    }
  });

  it('finishes an interrupted run after a restart without analysing a finished trace twice', async () => {
    await planner.patch(`/api/cables/${cableId}`, { vf: 0.68, reason: 'Second drum' }).expect(200);
    const heads = (await Trace.findAll({ where: { reanalysisOfId: traceIds } })).map((t) => t.id).sort((a, b) => a - b);
    // What a killed instance leaves: the run row, the first trace recorded, the rest not.
    const run = await CableReanalysis.create({ cableTypeId: cableId, cableTypeRevision: 3, vf: 0.68, requestedById: api.users.planner.id, status: 'running', traceTotal: 3, traceIds: heads });
    const first = await Trace.create({ ...(await Trace.findByPk(heads[0], { raw: true }))!, id: undefined, reanalysisOfId: heads[0], createdAt: undefined, updatedAt: undefined } as never);
    await CableReanalysisItem.create({ reanalysisId: run.id, traceId: heads[0], resultTraceId: first.id, outcome: 'ok', note: null, findings: 0, findingsMoved: 0, findingsUnmatched: 0, maxShiftM: null, sumShiftM: 0 });
    if (api.app.ctx.jobs.engine === 'in-process') {
      // On SQLite the steps lived in memory: starting again queues what is left from the run's own record.
      await registerCableReanalysis(api.app.ctx);
    } else {
      // On PostgreSQL the steps are rows of the queue: one for the whole run, as the killed instance had sent.
      await api.app.ctx.jobs.send('cable-reanalysis', { reanalysisId: run.id, traceIds: heads });
    }
    await eventually(async () => (await CableReanalysis.findByPk(run.id))!.status === 'done', 'the run to finish', 60_000);
    expect(await CableReanalysisItem.count({ where: { reanalysisId: run.id } })).toBe(3);
    for (const id of heads) expect(await Trace.count({ where: { reanalysisOfId: id } })).toBe(1);
  });
});

describe('a re-analysis stored but never queued', () => {
  it('is queued again when an instance starts, and finishes with each trace analysed once', async () => {
    await planner.patch(`/api/cables/${cableId}`, { vf: 0.69, reason: 'Third drum' }).expect(200);
    // The newest analysis of each of the three uploads: the traces no later re-analysis has replaced.
    const all = await Trace.findAll({ attributes: ['id', 'reanalysisOfId'] });
    const replaced = new Set(all.map((t) => t.reanalysisOfId));
    const newest = all.map((t) => t.id).filter((id) => !replaced.has(id));
    expect(newest).toHaveLength(3);
    // What an instance killed between storing the run and queuing its steps leaves: the run, and no job at all.
    const run = await CableReanalysis.create({ cableTypeId: cableId, cableTypeRevision: 4, vf: 0.69, requestedById: api.users.planner.id, status: 'running', traceTotal: newest.length, traceIds: newest });
    expect(await api.app.ctx.jobs.unfinished('cable-reanalysis')).toEqual([]);
    await planner.post(`/api/cables/${cableId}/reanalyses`).expect(409);
    // An instance starting (on PostgreSQL any one of them; on SQLite the one) queues what no job holds.
    await registerCableReanalysis(api.app.ctx);
    await eventually(async () => (await CableReanalysis.findByPk(run.id))!.status === 'done', 'the run to finish', 60_000);
    expect(await CableReanalysisItem.count({ where: { reanalysisId: run.id } })).toBe(newest.length);
    for (const id of newest) expect(await Trace.count({ where: { reanalysisOfId: id } })).toBe(1);
  }, 90_000);
});

describe('finding moves', () => {
  it('matches findings by round-trip time and counts moves of 5 cm or more', () => {
    const analysis = { events: [{ roundTripNs: 1010, distanceM: 106.1 }, { roundTripNs: 606, distanceM: 60.01 }] } as never;
    const s = findingShifts(
      [
        { roundTripNs: 1010, distanceM: 100 },
        { roundTripNs: 606, distanceM: 60 },
        { roundTripNs: 3000, distanceM: 300 },
      ],
      analysis,
    );
    expect(s.findings).toBe(3);
    expect(s.findingsMoved).toBe(1);
    expect(s.findingsUnmatched).toBe(1);
    expect(s.maxShiftM).toBeCloseTo(6.1, 9);
    expect(s.sumShiftM).toBeCloseTo(6.11, 9);
  });
});
