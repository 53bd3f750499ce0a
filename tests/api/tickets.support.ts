import { SiteSupervisor } from '../../server/db/models';
import { makeRun, stepTraceCsv } from './support/field-fixtures';
import type { TestApi } from './support/api';

/** A run (200 m; MH-1 at 40 m with 2 m coiled, MH-2 at 80 m with 3 m, P-7 at 120 m) whose site the test supervisor looks after. */
export async function supervisedRun(api: TestApi, name: string) {
  const fx = await makeRun(name);
  await SiteSupervisor.create({ siteId: fx.site.id, userId: api.users.supervisor.id });
  return fx;
}

/** Upload a trace with an open `faultM` metres from `end` (VF 0.66) and confirm its first event as a finding. */
export async function confirmedFinding(api: TestApi, runId: number, faultM: number, end: 'A' | 'B' = 'A') {
  const c = await api.as('technician');
  const up = await c
    .postRaw('/api/traces')
    .field('cableRunId', String(runId))
    .field('end', end)
    .attach('file', Buffer.from(stepTraceCsv({ faultM, vf: 0.66 })), `${end}-${faultM}.csv`)
    .expect(201);
  const res = await c.post('/api/findings', { traceId: up.body.traces[0].id, eventIndex: 0, status: 'confirmed', kind: 'open-conductor', note: 'by the kerb' }).expect(201);
  return res.body as { id: number; distanceM: number; roundTripNs: number; windowStartM: number; windowEndM: number; routePositionText: string };
}
