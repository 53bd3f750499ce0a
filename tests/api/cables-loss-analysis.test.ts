import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CableRun, CableType, Site } from '../../server/db/models';
import { stepTraceCsv } from './support/field-fixtures';
import { solidPePair } from './support/cables';
import { startApi, type TestApi } from './support/api';

let api: TestApi;
let runId: number;
beforeAll(async () => {
  api = await startApi();
  const planner = await api.as('planner');
  const { body: cable } = await planner
    .post(
      '/api/cables',
      solidPePair('Pulse VF test pair', {
        vfReference: 'solid PE, εr ≈ 2.3',
        attenuation: [{ frequencyMhz: 1, dbPer100m: 1.6 }],
        lossSource: 'typical of 0.5 mm PE pairs, from memory',
        pulseVfs: [{ pulseWidthNs: 100, vf: 0.63, source: 'yard test on drum 4' }],
      }),
    )
    .expect(201);
  const site = await Site.create({ name: 'Pulse VF site', address: null, latitude: null, longitude: null, accessNotes: null });
  const run = await CableRun.create({
    siteId: site.id,
    name: 'Pulse VF run',
    cableTypeId: (await CableType.findByPk(cable.id))!.id,
    endALabel: 'Cabinet',
    endBLabel: 'Pole',
    installedLengthM: 150,
    notes: null,
  });
  runId = run.id;
});
afterAll(() => api.close());

let uploads = 0;
/** Each upload is a different file (the server refuses a repeat of the same bytes on a run). */
const upload = async (fields: Record<string, string>) => {
  uploads += 1;
  const tech = await api.as('technician');
  const req = tech.postRaw('/api/traces').field('cableRunId', String(runId)).field('end', 'A');
  for (const [k, v] of Object.entries(fields)) req.field(k, v);
  const res = await req
    .attach('file', Buffer.from(stepTraceCsv({ faultM: 100, vf: 0.63, samples: 3000 + uploads })), 'pair.csv')
    .expect(201);
  return res.body.traces[0];
};

describe('the library VF an analysis uses', () => {
  it('is the VF measured at the trace pulse width when the library records one', async () => {
    const t = await upload({ pulseWidthNs: '100' });
    expect(t.analysis.vf).toBe(0.63);
    // The library's attenuation reached the engine.
    expect(t.analysis.lossSource).toBe('library');
    expect(t.analysis.lossDbPer100m.find((p: { frequencyHz: number }) => p.frequencyHz === 1e6).dbPer100m).toBeCloseTo(1.6, 2);
    // The open was made at 100 m on a VF-0.63 line (tests/support/step-trace.ts): with the matching VF it reads 100 m.
    const end = t.analysis.events.find((e: { isCableEnd: boolean }) => e.isCableEnd);
    expect(end.distanceM).toBeGreaterThan(99);
    expect(end.distanceM).toBeLessThan(101);
  });

  it('is the entry VF for another pulse width, and an explicit VF wins over both', async () => {
    expect((await upload({ pulseWidthNs: '500' })).analysis.vf).toBe(0.66);
    expect((await upload({ pulseWidthNs: '100', vfOverride: '0.64', vfOverrideReason: 'crew measured it' })).analysis.vf).toBe(
      0.64,
    );
  });
});
