import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CableRun, Trace } from '../../server/db/models';
import type { SampleTrace } from '../../shared/schemas/traces';
import { startApi, type TestApi } from './support/api';

const SAMPLES = path.resolve('server/db/demo/samples');

describe('sample traces to try an upload with, on the demo data', () => {
  let demo: TestApi;
  beforeAll(async () => {
    demo = await startApi({ demoData: true });
  });
  afterAll(() => demo?.close());

  it('are offered on the demo for runs the seed left without a trace, and an upload of one gives the simulated fault, not "already uploaded"', async () => {
    const tech = await demo.signIn('tech@example.com', 'rholog-demo');
    const items = (await tech.get('/api/sample-traces').expect(200)).body.items as SampleTrace[];
    expect(items.map((s) => [s.file, s.siteName, s.cableRunName, s.end, s.endLabel, s.triedAsTraceId])).toEqual([
      ['oakhollow-data-link-short.csv', 'Oakhollow cabinet row', 'Data link OH-D1', 'A', 'Cabinet OH-4', null],
      ['brookfold-telemetry-open.csv', 'Brookfold pumping station', 'Telemetry pair BF-T1', 'A', 'Pump house cabinet', null],
    ]);
    for (const s of items) {
      // The seed loaded no trace on the sample's run, so nothing there can make the upload a copy.
      expect(await Trace.count({ where: { cableRunId: s.cableRunId } })).toBe(0);
      expect((await CableRun.findByPk(s.cableRunId))!.siteId).toBe(s.siteId);
      expect(s.sizeBytes).toBe(fs.statSync(path.join(SAMPLES, s.file)).size);
    }

    const sample = items[0];
    const file = await tech.get(`/api/sample-traces/${sample.file}`).expect(200).buffer(true);
    expect(file.headers['content-type']).toMatch(/^text\/csv/);
    expect(Buffer.compare(Buffer.from(file.text), fs.readFileSync(path.join(SAMPLES, sample.file)))).toBe(0);

    const up = await tech
      .postRaw('/api/traces')
      .field('cableRunId', String(sample.cableRunId))
      .field('end', sample.end)
      .attach('file', Buffer.from(file.text), sample.file)
      .expect(201);
    expect(up.body.duplicates).toEqual([]);
    const events = up.body.traces[0].analysis.events as Array<{ distanceM: number; type: string }>;
    // scripts/make-demo-traces.ts put a 1 Ω short 57.3 m from end A, with the library's VF for this cable (0.675).
    const short = events.find((e) => e.type === 'short')!;
    expect(Math.abs(short.distanceM - 57.3)).toBeLessThan(1.5);

    // Tried once, the list links to that trace instead of offering an upload that would be refused as a copy.
    const after = (await tech.get('/api/sample-traces').expect(200)).body.items as SampleTrace[];
    expect(after.find((s) => s.file === sample.file)!.triedAsTraceId).toBe(up.body.traces[0].id);
    expect(after.find((s) => s.file !== sample.file)!.triedAsTraceId).toBeNull();
  });

  it('names a file that is not one of the samples in a 404', async () => {
    const tech = await demo.signIn('tech2@example.com', 'rholog-demo');
    expect((await tech.get('/api/sample-traces/..%2Fmanifest.json').expect(404)).body.error.message).toBe(
      'Sample trace ../manifest.json was not found.',
    );
  });
});

describe('sample traces without the demo data', () => {
  let plain: TestApi;
  beforeAll(async () => {
    plain = await startApi();
  });
  afterAll(() => plain?.close());

  it('offers none, and a sample file asked for by name is not there', async () => {
    const tech = await plain.as('technician');
    expect((await tech.get('/api/sample-traces').expect(200)).body.items).toEqual([]);
    expect((await tech.get('/api/sample-traces/oakhollow-data-link-short.csv').expect(404)).body.error.message).toBe(
      'Sample trace oakhollow-data-link-short.csv was not found.',
    );
  });
});
