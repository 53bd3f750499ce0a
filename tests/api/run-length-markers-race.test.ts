import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { QueryTypes } from 'sequelize';
import { CableRun, RouteMarker } from '../../server/db/models';
import { isPostgres, startApi, type TestApi } from './support/api';
import { eventually } from './mail.support';
import { makeRun } from './support/field-fixtures';

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
function pauseReadOfRun(id: number) {
  let reached!: () => void;
  let release!: () => void;
  const reachedP = new Promise<void>((r) => (reached = r));
  const released = new Promise<void>((r) => (release = r));
  let armed = true;
  CableRun.addHook('afterFind', 'pause-read-of-run', async (result: unknown, options: { transaction?: unknown }) => {
    if (!armed || !options.transaction || (result as CableRun | null)?.id !== id) return;
    armed = false;
    reached();
    await released;
  });
  return {
    reached: reachedP,
    release: () => {
      CableRun.removeHook('afterFind', 'pause-read-of-run');
      release();
    },
  };
}

async function someoneWaitsForALock() {
  if (!isPostgres) return true;
  const [row] = await api.app.ctx.sequelize.query<{ n: string }>(
    "SELECT count(*) AS n FROM pg_stat_activity WHERE datname = current_database() AND wait_event_type = 'Lock'",
    { type: QueryTypes.SELECT },
  );
  return Number(row.n) > 0;
}

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
    await eventually(async () => shortened !== null || (await someoneWaitsForALock()), 'the length change to finish or wait');
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
