import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CableRun, RouteMarker } from '../../server/db/models';
import { startApi, type TestApi } from './support/api';
import { eventually } from './mail.support';
import { makeRun } from './support/field-fixtures';
import { foundId, pauseFirstRead, someoneWaitsForALock } from './support/pause';

/**
 * One supervisor saves a run's route markers while another shortens the run. Each change is checked against the
 * other half (markers must lie within the installed length less the slack); made at the same moment, the two must
 * still end in a run whose markers all lie on its route, whichever comes first. On PostgreSQL the marker save read
 * the run's length without holding the row, and a marker could end up past the end of the shortened route.
 */
let api: TestApi;
beforeAll(async () => {
  api = await startApi();
});
afterAll(() => api.close());

/** Pauses the first read of run `id` made inside a transaction until `release()`; `reached` resolves when it happens. */
const pauseReadOfRun = (id: number) => pauseFirstRead(CableRun, 'pause-read-of-run', (result) => foundId(result, id));

describe('saving route markers while the run is shortened', () => {
  it('ends with every marker on the route', async () => {
    const { run } = await makeRun('Markers and length run');
    const sup = await api.as('supervisor');
    const other = await api.as('supervisor');
    const markers = [
      { label: 'MH-1', kind: 'manhole', chainageM: 40, slackM: 2 },
      { label: 'MH-9', kind: 'manhole', chainageM: 170, slackM: 0 },
    ];
    const shorter = { name: run.name, cableTypeId: run.cableTypeId, endALabel: run.endALabel, endBLabel: run.endBLabel, installedLengthM: 150 };

    const pause = pauseReadOfRun(run.id);
    const saving = sup.put(`/api/cable-runs/${run.id}/markers`, { markers }).then((r) => r);
    await pause.reached;
    let shortened: { status: number } | null = null;
    const shortening = other.put(`/api/cable-runs/${run.id}`, shorter).then((r) => (shortened = r));
    await eventually(async () => shortened !== null || (await someoneWaitsForALock(api)), 'the length change to finish or wait');
    pause.release();
    const [saved] = await Promise.all([saving, shortening]);

    const now = (await CableRun.findByPk(run.id))!;
    const stored = await RouteMarker.findAll({ where: { cableRunId: run.id } });
    const route = now.installedLengthM - stored.reduce((s, m) => s + m.slackM, 0);
    expect(stored.filter((m) => m.chainageM > route).map((m) => m.label)).toEqual([]);
    // One of the two was refused for the other's sake.
    expect([saved.status, shortened!.status].sort()).toEqual([200, 422]);
  });
});
