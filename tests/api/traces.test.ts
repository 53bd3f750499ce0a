import { createHash } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { CableRun, CableType, Finding, Trace } from '../../server/db/models';
import { analysisPool } from '../../server/traces/analysis-pool';
import { makeRun, stepTraceCsv } from './support/field-fixtures';
import { startApi, type TestApi } from './support/api';

let api: TestApi;
let runId: number;

beforeAll(async () => {
  api = await startApi({ maxUploadBytes: 200_000 });
  runId = (await makeRun()).run.id;
});
afterAll(() => api.close());

const sha = (b: Buffer | string) => createHash('sha256').update(b).digest('hex');
const storedFiles = () => {
  const root = path.join(api.app.ctx.config.uploadDir, 'traces');
  if (!fs.existsSync(root)) return [];
  return fs.readdirSync(root, { recursive: true, withFileTypes: true }).filter((d) => d.isFile());
};

describe('POST /api/traces', () => {
  it('stores a good file unchanged, analyses it with the cable VF and places the open on the route', async () => {
    // A CRLF file with a BOM: the stored bytes must be these bytes, not a re-encoded copy.
    const csv = Buffer.from('\ufeff' + stepTraceCsv({ faultM: 100, vf: 0.66 }).replace(/\n/g, '\r\n'), 'utf8');
    const c = await api.as('technician');
    const res = await c.postRaw('/api/traces').field('cableRunId', String(runId)).field('end', 'A').attach('file', csv, 'run7-from-cabinet.csv').expect(201);
    const t = res.body.traces[0];
    expect(t.status).toBe('ok');
    expect(t.originalName).toBe('run7-from-cabinet.csv');
    expect(t.sizeBytes).toBe(csv.length);
    expect(t.sha256).toBe(sha(csv));
    expect(t.vf).toBe(0.66);
    expect(t.vfTolerance).toBe(0.02);
    expect(t.z0Ohm).toBe(50);
    expect(t.engineVersion).toMatch(/^\d+\.\d+\.\d+$/);
    // d = VF·c·t/2 with the open placed at 100 m when the file was made (hand-worked from the formula);
    // the engine's tolerance goal is max(0.5 m, 1 % of distance).
    const open = t.analysis.events.find((e: { type: string }) => e.type === 'open');
    expect(open.distanceM).toBeGreaterThan(99.5);
    expect(open.distanceM).toBeLessThan(100.5);
    expect(t.samples.length).toBeGreaterThan(100);

    const raw = await c.get(`/api/traces/${t.id}/raw`).buffer(true).parse((r, cb) => {
      const chunks: Buffer[] = [];
      r.on('data', (d: Buffer) => chunks.push(d));
      r.on('end', () => cb(null, Buffer.concat(chunks)));
    }).expect(200);
    expect(Buffer.compare(raw.body as Buffer, csv)).toBe(0);
    expect(raw.headers['x-content-sha256']).toBe(sha(csv));
    const row = await Trace.findByPk(t.id);
    const onDisk = fs.readFileSync(path.join(api.app.ctx.config.uploadDir, row!.rawPath));
    expect(sha(onDisk)).toBe(sha(csv));
  });

  it('lets a technician upload to any site, not only one they are linked to', async () => {
    const other = await makeRun('Far run');
    const c = await api.as('technician');
    const res = await c
      .postRaw('/api/traces')
      .field('cableRunId', String(other.run.id))
      .field('end', 'B')
      .attach('file', Buffer.from(stepTraceCsv({ faultM: 60, vf: 0.66 })), 'far.csv')
      .expect(201);
    expect(res.body.traces[0].siteId).toBe(other.site.id);
    expect(res.body.traces[0].end).toBe('B');
    expect(res.body.traces[0].endLabel).toBe('Pole 14');
  });

  it('keeps a file the engine cannot read, marked failed with the line, and makes no finding from it', async () => {
    const bad = Buffer.from(['time_ns,voltage_V', ...Array.from({ length: 40 }, (_, i) => (i === 17 ? `${i},abc` : `${i},0.1`))].join('\n'));
    const before = storedFiles().length;
    const c = await api.as('technician');
    const res = await c.postRaw('/api/traces').field('cableRunId', String(runId)).field('end', 'A').attach('file', bad, 'broken.csv').expect(422);
    expect(res.body.error.code).toBe('trace_unreadable');
    // The header is line 1, so the sample written with i = 17 is on line 19.
    expect(res.body.error.message).toContain('line 19');
    expect(res.body.error.fields[0]).toMatchObject({ field: 'file', line: 19 });
    const stored = res.body.error.traces[0];
    expect(stored.status).toBe('failed');
    expect(stored.error.line).toBe(19);
    expect(stored.sha256).toBe(sha(bad));
    expect(storedFiles().length).toBe(before + 1);
    const t = await c.get(`/api/traces/${stored.id}`).expect(200);
    expect(t.body.status).toBe('failed');
    const f = await c.post('/api/findings', { traceId: stored.id, eventIndex: 0, status: 'confirmed', kind: 'open-conductor' }).expect(422);
    expect(f.body.error.code).toBe('trace_failed');
    expect(await Finding.count({ where: { traceId: stored.id } })).toBe(0);
  });

  it('refuses a file over the size limit with the limit in the message and stores nothing', async () => {
    const before = await Trace.count();
    const filesBefore = storedFiles().length;
    const big = Buffer.alloc(200_001, '1,0.5\n');
    const c = await api.as('technician');
    const res = await c.postRaw('/api/traces').field('cableRunId', String(runId)).field('end', 'A').attach('file', big, 'huge.csv').expect(413);
    expect(res.body.error.code).toBe('file_too_large');
    // 200 000 bytes / 1 048 576 = 0.19 MB, rounded to one decimal.
    expect(res.body.error.message).toContain('0.2 MB');
    expect(await Trace.count()).toBe(before);
    expect(storedFiles().length).toBe(filesBefore);
  });

  it('refuses a file that is not CSV and names it', async () => {
    const before = await Trace.count();
    const c = await api.as('technician');
    const png = Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);
    const res = await c.postRaw('/api/traces').field('cableRunId', String(runId)).field('end', 'A').attach('file', png, 'photo.png').expect(415);
    expect(res.body.error.code).toBe('wrong_file_type');
    expect(res.body.error.message).toContain('photo.png');
    expect(await Trace.count()).toBe(before);
  });

  it('says which field is wrong when the end or the run is missing', async () => {
    const c = await api.as('technician');
    const res = await c.postRaw('/api/traces').field('cableRunId', String(runId)).attach('file', Buffer.from('x'), 'a.csv').expect(400);
    expect(res.body.error.fields.map((f: { field: string }) => f.field)).toEqual(['end']);
    const none = await c.postRaw('/api/traces').field('cableRunId', '424242').field('end', 'A').attach('file', Buffer.from(stepTraceCsv({ faultM: 50, vf: 0.66 })), 'a.csv').expect(422);
    expect(none.body.error.fields[0].field).toBe('cableRunId');
  });

  it('needs a reason for a velocity-factor override and uses the override', async () => {
    const c = await api.as('technician');
    const csv = Buffer.from(stepTraceCsv({ faultM: 100, vf: 0.66 }));
    const noReason = await c.postRaw('/api/traces').field('cableRunId', String(runId)).field('end', 'A').field('vfOverride', '0.6').attach('file', csv, 'o.csv').expect(400);
    expect(noReason.body.error.fields[0].field).toBe('vfOverrideReason');
    const res = await c
      .postRaw('/api/traces')
      .field('cableRunId', String(runId))
      .field('end', 'A')
      .field('vfOverride', '0.6')
      .field('vfOverrideReason', 'cable replaced in 2019, type not recorded')
      .attach('file', csv, 'o.csv')
      .expect(201);
    const t = res.body.traces[0];
    expect(t.vf).toBe(0.6);
    // Same round-trip time at VF 0.60 instead of 0.66: 100 m × 0.60/0.66 = 90.9 m (hand-worked).
    expect(t.analysis.events[0].distanceM).toBeCloseTo(90.9, 0);
  });

  it('refuses a velocity factor no cable has and a sample interval finer than any instrument, naming the field', async () => {
    const c = await api.as('technician');
    const csv = Buffer.from(stepTraceCsv({ faultM: 100, vf: 0.66 }));
    for (const [field, value] of [
      ['vfOverride', '1e-300'],
      ['vfOverride', '0.19'],
      ['sampleIntervalNs', '1e-300'],
      ['sampleIntervalNs', '0.0005'],
    ]) {
      const res = await c
        .postRaw('/api/traces')
        .field('cableRunId', String(runId))
        .field('end', 'A')
        .field(field, value)
        .field('vfOverrideReason', 'checking the bounds')
        .attach('file', csv, 'bounds.csv')
        .expect(400);
      expect(res.body.error.fields.map((f: { field: string }) => f.field)).toEqual([field]);
    }
    // The edges of the ranges are accepted.
    await c.postRaw('/api/traces').field('cableRunId', String(runId)).field('end', 'A').field('vfOverride', '0.2').field('vfOverrideReason', 'slowest practical cable').attach('file', Buffer.from(stepTraceCsv({ faultM: 37, vf: 0.66 })), 'slow.csv').expect(201);
  });

  it('stores several files of one upload together', async () => {
    const c = await api.as('supervisor');
    const res = await c
      .postRaw('/api/traces')
      .field('cableRunId', String(runId))
      .field('end', 'A')
      .attach('file', Buffer.from(stepTraceCsv({ faultM: 110, vf: 0.66 })), 'one.csv')
      .attach('file', Buffer.from('time_ns,voltage_V\n'), 'empty.csv')
      .expect(201);
    expect(res.body.traces.map((t: { originalName: string; status: string }) => [t.originalName, t.status])).toEqual([
      ['one.csv', 'ok'],
      ['empty.csv', 'failed'],
    ]);
  });

  it('answers with the run and cable as they are when the answer is made, not as they were read before the analysis', async () => {
    const { run, cable } = await makeRun('Renamed while analysing');
    const pool = analysisPool(api.app.ctx);
    const analyse = pool.analyse.bind(pool);
    // Someone edits the cable's library entry and renames the run while the file is in the analysis worker.
    const spy = vi.spyOn(pool, 'analyse').mockImplementationOnce(async (job) => {
      const out = await analyse(job);
      await CableType.update({ vfTolerance: cable.vfTolerance + 0.001, revision: cable.revision + 1 }, { where: { id: cable.id } });
      await CableRun.update({ name: 'Renamed mid-analysis', endBLabel: 'Pole 15' }, { where: { id: run.id } });
      return out;
    });
    try {
      const c = await api.as('technician');
      const res = await c
        .postRaw('/api/traces')
        .field('cableRunId', String(run.id))
        .field('end', 'B')
        .attach('file', Buffer.from(stepTraceCsv({ faultM: 95, vf: 0.66 })), 'mid-edit.csv')
        .expect(201);
      expect(spy).toHaveBeenCalledTimes(1);
      const [t] = res.body.traces;
      expect([t.cableRunName, t.endLabel, t.cableRun.name, t.libraryChangedSince]).toEqual(['Renamed mid-analysis', 'Pole 15', 'Renamed mid-analysis', true]);
      expect((await c.get(`/api/traces/${t.id}`).expect(200)).body).toEqual(t);
    } finally {
      spy.mockRestore();
    }
  });

  it('answers with each stored trace as its page shows it: run, markers, cable, findings and samples', async () => {
    const { run } = await makeRun('Answer run');
    const c = await api.as('technician');
    const res = await uploadGoodAndUnreadable(c, run.id, 'B', 130, 'answer');
    const [good, short] = res.body.traces;
    expect(good.cableRun).toMatchObject({ id: run.id, name: 'Answer run', endBLabel: 'Pole 14', cableTypeName: 'Test solid PE coax' });
    expect(good.cableRun.markers.map((m: { label: string }) => m.label)).toEqual(['MH-1', 'MH-2', 'P-7']);
    expect(good.endLabel).toBe('Pole 14');
    expect(good.libraryChangedSince).toBe(false);
    expect([good.findingCount, good.findings]).toEqual([0, []]);
    expect(good.sampleCount).toBeGreaterThan(100);
    expect(short.status).toBe('failed');
    for (const t of res.body.traces) expect((await c.get(`/api/traces/${t.id}`).expect(200)).body).toEqual(t);
  });
});

/** One upload of two files: a step trace with a fault at `faultM` (VF 0.66) and a one-row file too short to read. */
async function uploadGoodAndUnreadable(c: Awaited<ReturnType<TestApi['as']>>, runId: number, end: 'A' | 'B', faultM: number, prefix: string) {
  return c
    .postRaw('/api/traces')
    .field('cableRunId', String(runId))
    .field('end', end)
    .attach('file', Buffer.from(stepTraceCsv({ faultM, vf: 0.66 })), `${prefix}-good.csv`)
    .attach('file', Buffer.from('time_ns,voltage_V\n1,0.1\n'), `${prefix}-short.csv`)
    .expect(201);
}

describe('GET /api/traces', () => {
  it('pages, filters by status and sorts by name', async () => {
    const c = await api.as('planner');
    const failed = await c.get('/api/traces?status=failed').expect(200);
    expect(failed.body.items.length).toBeGreaterThanOrEqual(2);
    expect(failed.body.items.every((t: { status: string }) => t.status === 'failed')).toBe(true);
    const page = await c.get('/api/traces?pageSize=2&page=1&sort=originalName&dir=asc').expect(200);
    expect(page.body.items).toHaveLength(2);
    const names = page.body.items.map((t: { originalName: string }) => t.originalName);
    expect([...names].sort()).toEqual(names);
    expect(page.body.total).toBe(await Trace.count());
    const bad = await c.get('/api/traces?from=yesterday').expect(400);
    expect(bad.body.error.fields[0].field).toBe('from');
  });

  it('gives each row its number of events, counted from the stored analysis, and 0 for a file that could not be read', async () => {
    const { run } = await makeRun('Counted run');
    const c = await api.as('technician');
    const res = await uploadGoodAndUnreadable(c, run.id, 'A', 140, 'counted');
    const [good, short] = res.body.traces;
    const stored = (await Trace.findByPk(good.id))!;
    expect(stored.analysis!.events.length).toBeGreaterThan(0);
    const list = await c.get(`/api/traces?cableRunId=${run.id}&sort=originalName&dir=asc`).expect(200);
    expect(list.body.items.map((t: { id: number; eventCount: number }) => [t.id, t.eventCount])).toEqual([
      [good.id, stored.analysis!.events.length],
      [short.id, 0],
    ]);
  });
});

describe('PUT /api/traces/:id/reference', () => {
  it('keeps one reference per run and end, and compares later traces with it', async () => {
    const sup = await api.as('supervisor');
    const tech = await api.as('technician');
    const { run } = await makeRun('Baseline run');
    const up = async (csv: string, name: string) =>
      (await tech.postRaw('/api/traces').field('cableRunId', String(run.id)).field('end', 'A').attach('file', Buffer.from(csv), name).expect(201)).body.traces[0];
    const ref = await up(stepTraceCsv({ faultM: 150, vf: 0.66 }), 'commissioning.csv');
    await tech.put(`/api/traces/${ref.id}/reference`, { isReference: true }).expect(403);
    await sup.put(`/api/traces/${ref.id}/reference`, { isReference: true }).expect(200);
    const later = await up(stepTraceCsv({ faultM: 60, vf: 0.66 }), 'later.csv');
    const view = await tech.get(`/api/traces/${later.id}`).expect(200);
    expect(view.body.comparison.referenceTraceId).toBe(ref.id);
    // The later trace's open at 60 m is not in the reference; the reference's end at 150 m is gone.
    const newOnes = view.body.comparison.newEventIndexes.map((i: number) => view.body.analysis.events[i].distanceM);
    expect(newOnes.some((d: number) => Math.abs(d - 60) < 1)).toBe(true);
    expect(view.body.comparison.missingReferenceEvents.some((e: { distanceM: number }) => Math.abs(e.distanceM - 150) < 1)).toBe(true);
    // A new recording of the same cable (one sample longer): the very same bytes again would be a duplicate upload.
    const second = await up(stepTraceCsv({ faultM: 150, vf: 0.66, samples: 3001 }), 'recommissioned.csv');
    await sup.put(`/api/traces/${second.id}/reference`, { isReference: true }).expect(200);
    expect((await Trace.findAll({ where: { cableRunId: run.id, isReference: true } })).map((t) => t.id)).toEqual([second.id]);
  });
});
