import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CableType } from '../../server/db/models';
import type { CableReanalysisView } from '../../shared/schemas/cable-reanalysis';
import { makeRun, stepTraceCsv } from './support/field-fixtures';
import { startApi, type Client, type TestApi } from './support/api';
import { eventually } from './mail.support';

let api: TestApi;
let tech: Client;
let planner: Client;
let runId: number;
let firstTypeId: number;
let secondTypeId: number;
let traceId: number;

type Event = { isCableEnd: boolean; distanceM: number };

/** Give the run another cable type, as a planner does on the run's page (every other field as it is). */
async function giveRunType(cableTypeId: number) {
  const run = (await planner.get(`/api/cable-runs/${runId}`).expect(200)).body;
  const { name, endALabel, endBLabel, installedLengthM, notes } = run;
  await planner.put(`/api/cable-runs/${runId}`, { name, cableTypeId, endALabel, endBLabel, installedLengthM, notes }).expect(200);
}

beforeAll(async () => {
  api = await startApi({ jobs: { maintenanceSeconds: 1, pollSeconds: 0.5, leaseSeconds: 30, shutdownGraceMs: 2000 } });
  const { run, cable } = await makeRun('Type change run');
  runId = run.id;
  firstTypeId = cable.id;
  // A second type at the same revision as the first (both new, revision 1), with another VF.
  const second = await CableType.create({
    name: 'Test PVC pair for a type change',
    construction: 'twisted-pair',
    dielectric: 'PVC',
    z0Ohm: 100,
    vf: 0.55,
    vfTolerance: 0.03,
    attenuationDbPer100m: null,
    attenuationFreqMhz: null,
    vfSource: 'handbook',
    vfReference: 'PVC pair, from memory',
    notes: null,
  });
  secondTypeId = second.id;
  expect((await CableType.findByPk(firstTypeId))!.revision).toBe(second.revision);
  tech = await api.as('technician');
  planner = await api.as('planner');
  const up = await tech
    .postRaw('/api/traces')
    .field('cableRunId', String(runId))
    .field('end', 'A')
    .attach('file', Buffer.from(stepTraceCsv({ faultM: 120, vf: 0.66 })), 'before-type-change.csv')
    .expect(201);
  traceId = up.body.traces[0].id;
  expect(up.body.traces[0].vf).toBe(0.66);
  expect(up.body.traces[0].libraryChangedSince).toBe(false);
});
afterAll(() => api?.close());

describe('a cable run given another cable type after its traces were analysed', () => {
  it('shows each trace as analysed with other library values, naming the type it was analysed as', async () => {
    await giveRunType(secondTypeId);
    const t = (await tech.get(`/api/traces/${traceId}`).expect(200)).body;
    expect(t.vf).toBe(0.66);
    expect(t.cableRun.cableTypeName).toBe('Test PVC pair for a type change');
    expect(t.libraryChangedSince).toBe(true);
    expect(t.analysedCableType).toEqual({ id: firstTypeId, name: 'Test solid PE coax' });
  });

  it('is analysed again with the new type, and again with the first type once the run is given it back', async () => {
    const withSecond = (await tech.post(`/api/traces/${traceId}/reanalyse`).expect(201)).body;
    expect(withSecond.vf).toBe(0.55);
    expect(withSecond.libraryChangedSince).toBe(false);
    expect(withSecond.analysedCableType).toBeNull();

    await giveRunType(firstTypeId);
    const stale = (await tech.get(`/api/traces/${withSecond.id}`).expect(200)).body;
    expect(stale.libraryChangedSince).toBe(true);
    expect(stale.analysedCableType).toEqual({ id: secondTypeId, name: 'Test PVC pair for a type change' });
    const back = await tech.post(`/api/traces/${traceId}/reanalyse`).expect(201);
    expect(back.body.id).not.toBe(withSecond.id);
    expect(back.body.vf).toBe(0.66);
    expect(back.body.libraryChangedSince).toBe(false);
    // d = VF·c·t/2 (the distance formula): the 120 m end read with VF 0.66 again, not 0.55's 100 m.
    const end = (back.body.analysis.events as Event[]).find((e) => e.isCableEnd)!;
    expect(end.distanceM).toBeGreaterThan(119.5);
    expect(end.distanceM).toBeLessThan(120.5);
  });

  it("includes traces analysed as another type in the new type's re-analysis", async () => {
    const fresh = await tech
      .postRaw('/api/traces')
      .field('cableRunId', String(runId))
      .field('end', 'B')
      .attach('file', Buffer.from(stepTraceCsv({ faultM: 90, vf: 0.66 })), 'end-b-before-type-change.csv')
      .expect(201);
    expect(fresh.body.traces[0].vf).toBe(0.66);
    await giveRunType(secondTypeId);
    const started = (await planner.post(`/api/cables/${secondTypeId}/reanalyses`).expect(202)).body as CableReanalysisView;
    // The newest analyses on the run: the end-B upload and the re-analysis back to the first type, both made as the first type.
    expect(started.traceTotal).toBe(2);
    expect(started.vf).toBe(0.55);
    const done = await eventually(
      async () => {
        const r = (await planner.get(`/api/cables/${secondTypeId}/reanalyses/latest`).expect(200)).body
          .reanalysis as CableReanalysisView;
        return r.status === 'done' ? r : undefined;
      },
      'the re-analysis to finish',
      60_000,
    );
    expect(done).toMatchObject({ traceTotal: 2, tracesDone: 2, tracesOk: 2, tracesFailed: 0 });
  });
});
