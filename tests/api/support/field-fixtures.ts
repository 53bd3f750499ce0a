import { CableRun, CableType, RouteMarker, Site } from '../../../server/db/models';
import type { Client } from './api';
import { stepTraceCsv as stepCsv } from '../../support/step-trace';

export { stepTraceCsv } from '../../support/step-trace';

/** A site with one run of solid-PE coax (VF 0.66, a handbook value for solid polyethylene) and three route markers. */
export async function makeRun(name = 'Test run') {
  const cable =
    (await CableType.findOne({ where: { name: 'Test solid PE coax' } })) ??
    (await CableType.create({
      name: 'Test solid PE coax',
      construction: 'coax',
      dielectric: 'solid polyethylene',
      z0Ohm: 50,
      vf: 0.66,
      vfTolerance: 0.02,
      attenuationDbPer100m: null,
      attenuationFreqMhz: null,
      vfSource: 'handbook',
      vfReference: 'solid PE, εr ≈ 2.3',
      notes: null,
    }));
  const site = await Site.create({
    name: `${name} site ${Math.random().toString(36).slice(2, 8)}`,
    address: null,
    latitude: null,
    longitude: null,
    accessNotes: null,
  });
  const run = await CableRun.create({
    siteId: site.id,
    name,
    cableTypeId: cable.id,
    endALabel: 'Cabinet C-1',
    endBLabel: 'Pole 14',
    installedLengthM: 200,
    notes: null,
  });
  await RouteMarker.bulkCreate([
    { cableRunId: run.id, label: 'MH-1', kind: 'manhole', chainageM: 40, slackM: 2, notes: null },
    { cableRunId: run.id, label: 'MH-2', kind: 'manhole', chainageM: 80, slackM: 3, notes: null },
    { cableRunId: run.id, label: 'P-7', kind: 'pedestal', chainageM: 120, slackM: 0, notes: null },
  ]);
  return { cable, site, run };
}

type UploadedEvent = { index: number; distanceM: number; likelyMultipleOf: number | null };

/** Upload a step trace with a fault at `faultM` (VF 0.66) to end A of run `runId`: its id and its farthest own event. */
export async function uploadStepTrace(client: Client, runId: number, faultM: number) {
  const res = await client
    .postRaw('/api/traces')
    .field('cableRunId', String(runId))
    .field('end', 'A')
    .attach('file', Buffer.from(stepCsv({ faultM, vf: 0.66 })), `end-${faultM}.csv`)
    .expect(201);
  const t = res.body.traces[0] as { id: number; analysis: { events: UploadedEvent[] } };
  const far = t.analysis.events.filter((e) => e.likelyMultipleOf === null).reduce((a, b) => (b.distanceM > a.distanceM ? b : a));
  return { id: t.id, far };
}
