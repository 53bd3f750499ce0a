import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Trace } from '../../server/db/models';
import { analysePending, ANALYSIS_MAX_TRIES, requeueWaiting } from '../../server/traces/background-analysis';
import { eventually } from './mail.support';
import { makeRun, stepTraceCsv } from './support/field-fixtures';
import { startApi, type TestApi } from './support/api';

/**
 * Large uploads: stored at once as pending, answered 202, analysed by a
 * background job. The threshold is set per test through the app's config,
 * so the same file can be analysed both ways.
 */
let api: TestApi;
let runId: number;
const INLINE_MAX = 20_000;

beforeAll(async () => {
  api = await startApi({
    analysisInlineMaxBytes: INLINE_MAX,
    jobs: { maintenanceSeconds: 1, pollSeconds: 0.5, leaseSeconds: 30, shutdownGraceMs: 2000 },
  });
  runId = (await makeRun()).run.id;
});
afterAll(() => api.close());

type Ev = {
  type: string;
  distanceM: number;
  roundTripNs: number;
  reflectionCoefficient: number;
  windowStartM: number;
  windowEndM: number;
};
const eventsOf = (t: { analysis: { events: Ev[] } }) =>
  t.analysis.events.map((e) => ({
    type: e.type,
    distanceM: e.distanceM,
    roundTripNs: e.roundTripNs,
    rho: e.reflectionCoefficient,
    from: e.windowStartM,
    to: e.windowEndM,
  }));

async function upload(csv: string | Buffer, name: string, end: 'A' | 'B', expected: number) {
  const c = await api.as('technician');
  return c
    .postRaw('/api/traces')
    .field('cableRunId', String(runId))
    .field('end', end)
    .attach('file', Buffer.from(csv), name)
    .expect(expected);
}

async function settled(id: number) {
  const c = await api.as('technician');
  return eventually(
    async () => {
      const res = await c.get(`/api/traces/${id}`).expect(200);
      return res.body.status === 'pending' ? undefined : res.body;
    },
    `trace ${id} to leave "pending"`,
    30_000,
  );
}

describe('uploads above the inline limit', () => {
  // 3000 samples of "t,v" text: about 60 kB, three times the limit above.
  const csv = stepTraceCsv({ faultM: 120, vf: 0.66 });

  it('answers 202 with the pending trace and its Location, then analyses it to the same events as an upload analysed at once', async () => {
    expect(csv.length).toBeGreaterThan(INLINE_MAX);
    const res = await upload(csv, 'long-record.csv', 'A', 202);
    const t = res.body.traces[0];
    expect(t.status).toBe('pending');
    expect(t.analysis).toBeNull();
    expect(t.error).toBeNull();
    expect(t.sizeBytes).toBe(Buffer.byteLength(csv));
    expect(res.headers.location).toBe(`/api/traces/${t.id}`);

    const done = await settled(t.id);
    expect(done.status).toBe('ok');
    expect(done.vf).toBe(0.66);
    expect(done.samples.length).toBeGreaterThan(100);
    const row = await Trace.findByPk(t.id);
    expect([row!.analysisAttempts, row!.analysisLeaseUntil]).toEqual([1, null]);

    // The same bytes analysed inside the request (the limit raised for this upload, the other end so it is not a duplicate).
    api.app.ctx.config.analysisInlineMaxBytes = 10_000_000;
    try {
      const sync = (await upload(csv, 'long-record.csv', 'B', 201)).body.traces[0];
      expect(sync.status).toBe('ok');
      expect(eventsOf(done)).toEqual(eventsOf(sync));
      // The open was placed at 120 m when the file was made: d = VF·c·t/2 (hand-worked); engine goal max(0.5 m, 1 %).
      const open = done.analysis.events.find((e: Ev) => e.type === 'open');
      expect(Math.abs(open.distanceM - 120)).toBeLessThan(1.2);
    } finally {
      api.app.ctx.config.analysisInlineMaxBytes = INLINE_MAX;
    }
  });

  it('shows the status in the list, and refuses a finding, a reference or a re-analysis while pending with 409', async () => {
    const bigger = stepTraceCsv({ faultM: 80, vf: 0.66, samples: 3200 });
    const res = await upload(bigger, 'pending-one.csv', 'A', 202);
    const id = res.body.traces[0].id as number;
    await settled(id);
    // Back to pending and held by another instance (a live lease on the row), so it stays pending while we look.
    await Trace.update(
      { status: 'pending', analysis: null, analysisAttempts: 1, analysisLeaseUntil: new Date(Date.now() + 60_000) },
      { where: { id } },
    );
    await analysePending(api.app.ctx, id, new AbortController().signal);
    expect((await Trace.findByPk(id))!.status).toBe('pending');
    const c = await api.as('supervisor');
    const list = await c.get('/api/traces').query({ status: 'pending' }).expect(200);
    expect(list.body.items.map((i: { id: number; status: string }) => [i.id, i.status])).toContainEqual([id, 'pending']);
    const finding = await c
      .post('/api/findings', { traceId: id, eventIndex: 0, status: 'confirmed', kind: 'open-conductor' })
      .expect(409);
    expect(finding.body.error.code).toBe('trace_pending');
    expect(finding.body.error.message).toMatch(/still being analysed/);
    expect((await c.put(`/api/traces/${id}/reference`, { isReference: true }).expect(409)).body.error.code).toBe('trace_pending');
    expect((await c.post(`/api/traces/${id}/reanalyse`, {}).expect(409)).body.error.code).toBe('trace_pending');
    expect((await c.get(`/api/traces/${id}/samples`).query({ fromNs: 0, toNs: 500 }).expect(409)).body.error.code).toBe(
      'trace_pending',
    );
    // Released (the holder's lease ends): the next try analyses it.
    await Trace.update({ analysisLeaseUntil: null }, { where: { id } });
    await analysePending(api.app.ctx, id, new AbortController().signal);
    expect((await settled(id)).status).toBe('ok');
  });

  it('refuses a two-ended location and archiving while a trace is pending with 409 trace_pending', async () => {
    const fromA = await upload(stepTraceCsv({ faultM: 90, vf: 0.66, samples: 3200 }), 'pending-a.csv', 'A', 202);
    const fromB = await upload(stepTraceCsv({ faultM: 110, vf: 0.66, samples: 3200 }), 'pending-b.csv', 'B', 202);
    const [a, b] = [fromA.body.traces[0].id as number, fromB.body.traces[0].id as number];
    await settled(a);
    await settled(b);
    // Back to pending and held by another instance, so it stays pending while we look.
    await Trace.update(
      { status: 'pending', analysis: null, analysisAttempts: 1, analysisLeaseUntil: new Date(Date.now() + 60_000) },
      { where: { id: b } },
    );
    const c = await api.as('technician');
    const two = await c.get('/api/findings/two-ended').query({ traceA: a, eventA: 0, traceB: b, eventB: 0 }).expect(409);
    expect(two.body.error.code).toBe('trace_pending');
    expect(two.body.error.message).toBe(
      `Trace ${b} is still being analysed; it can be located from both ends once its analysis has finished (the trace page shows when).`,
    );
    expect(two.body.error.fields).toEqual([{ field: 'traceB', message: 'the trace is still being analysed' }]);
    const archive = await c.post(`/api/traces/${b}/archive`, { reason: 'Wrong cable clipped on, junk record' }).expect(409);
    expect(archive.body.error.code).toBe('trace_pending');
    const row = (await Trace.findByPk(b))!;
    expect([row.status, row.archivedAt]).toEqual(['pending', null]);
    // Released: the next try analyses it, and then it may be archived.
    await Trace.update({ analysisLeaseUntil: null }, { where: { id: b } });
    await analysePending(api.app.ctx, b, new AbortController().signal);
    expect((await settled(b)).status).toBe('ok');
    await c.post(`/api/traces/${b}/archive`, { reason: 'Wrong cable clipped on, junk record' }).expect(200);
  });

  it('ends a large file the engine cannot read as failed, with the reason and the line', async () => {
    const lines = csv.split('\n');
    lines[1500] = '1499.5,about a volt';
    const res = await upload(lines.join('\n'), 'broken-long.csv', 'A', 202);
    const done = await settled(res.body.traces[0].id);
    expect(done.status).toBe('failed');
    expect(done.analysis).toBeNull();
    // Line 1501 of the file: the header is line 1 and lines[1500] is the 1501st line.
    expect(done.error.line).toBe(1501);
    expect(done.error.message).toMatch(/about a volt/);
    expect(done.errorMessage).toBe(done.error.message);
  });

  it('ends a hostile 5 MB one-line file as failed in the background, with a short message naming line 2', async () => {
    const hostile = Buffer.concat([Buffer.from('time_ns,voltage_V\n'), Buffer.alloc(5 * 1024 * 1024, '7'), Buffer.from('\n')]);
    const res = await upload(hostile, 'one-line-long.csv', 'B', 202);
    const done = await settled(res.body.traces[0].id);
    expect([done.status, done.error.line]).toEqual(['failed', 2]);
    expect(done.error.message.length).toBeLessThanOrEqual(300);
    expect(done.sizeBytes).toBe(hostile.length);
  });

  it('retries trouble that is not the file, and ends failed with the last reason after the last try', async () => {
    const res = await upload(stepTraceCsv({ faultM: 60, vf: 0.66, samples: 3100 }), 'store-down.csv', 'A', 202);
    const id = res.body.traces[0].id as number;
    await settled(id);
    // Put it back to pending as if its stored file could not be fetched: the store answers with an error each time.
    await Trace.update({ status: 'pending', analysis: null, analysisAttempts: 0, analysisLeaseUntil: null }, { where: { id } });
    const storage = api.app.ctx.storage;
    const checkout = storage.checkout.bind(storage);
    storage.checkout = async () => {
      throw new Error('the object store did not answer');
    };
    try {
      const signal = new AbortController().signal;
      for (let i = 1; i < ANALYSIS_MAX_TRIES; i++) {
        await expect(analysePending(api.app.ctx, id, signal)).rejects.toThrow('the object store did not answer');
        const row = await Trace.findByPk(id);
        expect([row!.status, row!.analysisAttempts, row!.analysisLeaseUntil]).toEqual(['pending', i, null]);
      }
      await analysePending(api.app.ctx, id, signal);
    } finally {
      storage.checkout = checkout;
    }
    const row = await Trace.findByPk(id);
    expect([row!.status, row!.errorCode, row!.analysisAttempts]).toEqual(['failed', 'ANALYSIS_GAVE_UP', ANALYSIS_MAX_TRIES]);
    expect(row!.errorMessage).toBe(
      `The background analysis of this file did not finish after ${ANALYSIS_MAX_TRIES} tries (the last: the object store did not answer). The file is kept; analyse it again later.`,
    );
  });

  it('queues again a pending trace left idle past the limit, and leaves one that changed lately or is held', async () => {
    const ids: number[] = [];
    for (const [i, faultM] of [150, 160, 170].entries()) {
      const res = await upload(stepTraceCsv({ faultM, vf: 0.66, samples: 3400 + i }), `idle-${i}.csv`, 'A', 202);
      ids.push(res.body.traces[0].id);
      await settled(ids[i]);
    }
    const [idle, recent, held] = ids;
    await Trace.update(
      { status: 'pending', analysis: null, analysisAttempts: 1, analysisLeaseUntil: null },
      { where: { id: [idle, recent] } },
    );
    await Trace.update(
      { status: 'pending', analysis: null, analysisAttempts: 1, analysisLeaseUntil: new Date(Date.now() + 600_000) },
      { where: { id: held } },
    );
    const tenMinutesAgo = new Date(Date.now() - 600_000);
    await api.app.ctx.sequelize.query('UPDATE traces SET updated_at = :at WHERE id IN (:ids)', {
      replacements: { at: tenMinutesAgo, ids: [idle, held] },
    });
    expect(await requeueWaiting(api.app.ctx, 300_000)).toEqual([idle]);
    expect((await settled(idle)).status).toBe('ok');
    expect((await Trace.findByPk(recent))!.status).toBe('pending');
    expect((await Trace.findByPk(held))!.status).toBe('pending');
    // Leave none pending for the tests after this one.
    await Trace.update({ analysisLeaseUntil: null }, { where: { id: held } });
    for (const id of [recent, held]) await analysePending(api.app.ctx, id, new AbortController().signal);
    expect(await Trace.count({ where: { id: ids, status: 'ok' } })).toBe(3);
  });

  it('queues again at start-up a pending trace nobody holds (its instance stopped before the job ran)', async () => {
    const res = await upload(stepTraceCsv({ faultM: 140, vf: 0.66, samples: 3300 }), 'left-pending.csv', 'A', 202);
    const id = res.body.traces[0].id as number;
    await settled(id);
    await Trace.update(
      { status: 'pending', analysis: null, analysisAttempts: 1, analysisLeaseUntil: new Date(Date.now() + 600_000) },
      { where: { id } },
    );
    // A fresh start on SQLite: the lease of the process that held it is void; on PostgreSQL it would wait for it to end.
    if (api.app.ctx.jobs.engine === 'in-process') {
      const { registerTraceAnalysis } = await import('../../server/traces/background-analysis');
      await registerTraceAnalysis(api.app.ctx);
      const done = await settled(id);
      expect(done.status).toBe('ok');
      expect((await Trace.findByPk(id))!.analysisAttempts).toBe(2);
    } else {
      await Trace.update({ analysisLeaseUntil: new Date(Date.now() - 1000) }, { where: { id } });
      const { registerTraceAnalysis } = await import('../../server/traces/background-analysis');
      await registerTraceAnalysis(api.app.ctx);
      expect((await settled(id)).status).toBe('ok');
    }
  });
});
