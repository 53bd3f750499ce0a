import { createHash } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Trace, UploadReceipt } from '../../server/db/models';
import { boundedAnalysis } from '../../server/traces/analysis';
import { analysisPool, type AnalysisPool } from '../../server/traces/analysis-pool';
import { makeRun, stepTraceCsv } from './support/field-fixtures';
import { startApi, type Client, type TestApi } from './support/api';

/** Every file under a folder of the upload directory. */
function filesIn(api: TestApi, folder: 'traces' | 'incoming') {
  const dir = path.join(api.app.ctx.config.uploadDir, folder);
  return fs.existsSync(dir) ? fs.readdirSync(dir, { recursive: true, withFileTypes: true }).filter((d) => d.isFile()).map((d) => path.join(d.parentPath, d.name)) : [];
}
const sha = (b: Buffer) => createHash('sha256').update(b).digest('hex');

describe('uploads that are retried or repeated', () => {
  let api: TestApi;
  let tech: Client;
  let runId: number;
  beforeAll(async () => {
    // Every file here is analysed inside the request, up to the upload limit (tests/api/trace-pending.test.ts covers larger ones).
    api = await startApi({ analysisInlineMaxBytes: 20 * 1024 * 1024 });
    tech = await api.as('technician');
    runId = (await makeRun('Retry run')).run.id;
  });
  afterAll(() => api?.close());

  const send = (csv: Buffer, name: string, opts: { key?: string; end?: 'A' | 'B'; run?: number } = {}) => {
    const req = tech
      .postRaw('/api/traces')
      .field('cableRunId', String(opts.run ?? runId))
      .field('end', opts.end ?? 'A')
      .attach('file', csv, name);
    return opts.key ? req.set('Idempotency-Key', opts.key) : req;
  };

  it('answers a retry with the same Idempotency-Key with the first answer and stores the file once', async () => {
    const csv = Buffer.from(stepTraceCsv({ faultM: 70, vf: 0.66 }));
    const traces = await Trace.count();
    const files = filesIn(api, 'traces').length;
    const first = await send(csv, 'retry.csv', { key: 'upload-7f3a9c21' }).expect(201);
    const again = await send(csv, 'retry.csv', { key: 'upload-7f3a9c21' }).expect(201);
    expect(first.body.replayed).toBe(false);
    expect(again.body.replayed).toBe(true);
    expect(again.headers['idempotent-replayed']).toBe('true');
    expect(again.body.traces.map((t: { id: number }) => t.id)).toEqual(first.body.traces.map((t: { id: number }) => t.id));
    expect(again.body.traces[0].sha256).toBe(sha(csv));
    expect(await Trace.count()).toBe(traces + 1);
    expect(filesIn(api, 'traces')).toHaveLength(files + 1);
    expect(filesIn(api, 'incoming')).toEqual([]);
    const receipts = await UploadReceipt.findAll({ where: { idempotencyKey: 'upload-7f3a9c21' } });
    expect(receipts.map((r) => [r.userId, r.traceIds])).toEqual([[api.users.technician.id, [first.body.traces[0].id]]]);
  });

  it('stores a file once when two tries with the same key arrive together', async () => {
    const csv = Buffer.from(stepTraceCsv({ faultM: 75, vf: 0.66 }));
    const traces = await Trace.count();
    const [a, b] = await Promise.all([send(csv, 'twice.csv', { key: 'upload-both-at-once' }), send(csv, 'twice.csv', { key: 'upload-both-at-once' })]);
    expect([a.status, b.status]).toEqual([201, 201]);
    expect(a.body.traces[0].id).toBe(b.body.traces[0].id);
    expect([a.body.replayed, b.body.replayed].sort()).toEqual([false, true]);
    expect(await Trace.count()).toBe(traces + 1);
    expect(await Trace.count({ where: { sha256: sha(csv) } })).toBe(1);
    expect(filesIn(api, 'incoming')).toEqual([]);
  });

  it('refuses a key already used for another run or end, and a malformed key', async () => {
    const other = await makeRun('Other retry run');
    const res = await send(Buffer.from(stepTraceCsv({ faultM: 70, vf: 0.66 })), 'retry.csv', { key: 'upload-7f3a9c21', run: other.run.id }).expect(422);
    expect(res.body.error.code).toBe('idempotency_key_reused');
    expect(res.body.error.message).toContain('another cable run or end');
    expect(await Trace.count({ where: { cableRunId: other.run.id } })).toBe(0);
    const bad = await send(Buffer.from(stepTraceCsv({ faultM: 72, vf: 0.66 })), 'key.csv', { key: 'short' }).expect(400);
    expect(bad.body.error.code).toBe('bad_idempotency_key');
    expect(bad.body.error.fields[0].field).toBe('Idempotency-Key');
    expect(filesIn(api, 'incoming')).toEqual([]);
  });

  it('refuses a key reused for different bytes on the same run and end, and replays it for the same bytes under another name', async () => {
    const first = Buffer.from(stepTraceCsv({ faultM: 64, vf: 0.66 }));
    const other = Buffer.from(stepTraceCsv({ faultM: 118, vf: 0.66 }));
    const stored = await send(first, 'joint-3.csv', { key: 'upload-joint-3-a' }).expect(201);
    const traces = await Trace.count();
    const res = await send(other, 'joint-3.csv', { key: 'upload-joint-3-a' }).expect(422);
    expect(res.body.error.code).toBe('idempotency_key_reused');
    expect(res.body.error.message).toContain('different files');
    expect(res.body.error.fields).toEqual([{ field: 'Idempotency-Key', message: 'already used for different files' }]);
    expect(await Trace.count()).toBe(traces);
    expect(await Trace.count({ where: { sha256: sha(other) } })).toBe(0);
    // One file more than the first time is a different upload too.
    const more = await tech
      .postRaw('/api/traces')
      .field('cableRunId', String(runId))
      .field('end', 'A')
      .attach('file', first, 'joint-3.csv')
      .attach('file', other, 'joint-3b.csv')
      .set('Idempotency-Key', 'upload-joint-3-a')
      .expect(422);
    expect(more.body.error.code).toBe('idempotency_key_reused');
    const again = await send(first, 'joint-3 renamed.csv', { key: 'upload-joint-3-a' }).expect(201);
    expect(again.body.replayed).toBe(true);
    expect(again.body.traces[0].id).toBe(stored.body.traces[0].id);
    expect(filesIn(api, 'incoming')).toEqual([]);
  });

  it('reports the same bytes on the same run and end as a duplicate and does not store them again', async () => {
    const csv = Buffer.from(stepTraceCsv({ faultM: 80, vf: 0.66 }));
    const first = await send(csv, 'pole-14.csv').expect(201);
    const traces = await Trace.count();
    const files = filesIn(api, 'traces').length;
    const again = await send(csv, 'pole-14 (copy).csv').expect(409);
    expect(again.body.error.code).toBe('duplicate_upload');
    expect(again.body.error.message).toContain('pole-14 (copy).csv was already uploaded for this run and end');
    expect(again.body.error.message).toContain(`trace ${first.body.traces[0].id}`);
    expect(again.body.error.duplicates).toEqual([{ originalName: 'pole-14 (copy).csv', traceId: first.body.traces[0].id, uploadedAt: first.body.traces[0].createdAt }]);
    expect(await Trace.count()).toBe(traces);
    expect(filesIn(api, 'traces')).toHaveLength(files);
    expect(filesIn(api, 'incoming')).toEqual([]);
    // From the other end of the run it is another measurement: stored.
    await send(csv, 'pole-14.csv', { end: 'B' }).expect(201);
    expect(await Trace.count({ where: { sha256: sha(csv) } })).toBe(2);
  });

  it('recognises a repeated file by its bytes before analysing it: duplicates are never analysed, and name the upload they match', async () => {
    const csv = Buffer.from(stepTraceCsv({ faultM: 57, vf: 0.66 }));
    const fresh = Buffer.from(stepTraceCsv({ faultM: 59, vf: 0.66 }));
    const pool = analysisPool(api.app.ctx);
    const analysed: string[] = [];
    const real = pool.analyse.bind(pool);
    pool.analyse = (async (...args: Parameters<AnalysisPool['analyse']>) => {
      analysed.push(sha(fs.readFileSync(args[0].path)));
      return real(...args);
    }) as AnalysisPool['analyse'];
    try {
      const first = await send(csv, 'mh-7.csv').expect(201);
      expect(analysed).toEqual([sha(csv)]);
      const again = await send(csv, 'mh-7 again.csv').expect(409);
      expect(again.body.error.duplicates).toEqual([{ originalName: 'mh-7 again.csv', traceId: first.body.traces[0].id, uploadedAt: first.body.traces[0].createdAt }]);
      // One upload with the known file, a new one, and the new one twice: only the new file's bytes are analysed, once.
      const mixed = await tech
        .postRaw('/api/traces')
        .field('cableRunId', String(runId))
        .field('end', 'A')
        .attach('file', csv, 'mh-7 third.csv')
        .attach('file', fresh, 'mh-8.csv')
        .attach('file', fresh, 'mh-8 twice.csv')
        .expect(201);
      expect(mixed.body.traces.map((t: { originalName: string }) => t.originalName)).toEqual(['mh-8.csv']);
      expect(mixed.body.duplicates.map((d: { originalName: string; traceId: number }) => [d.originalName, d.traceId])).toEqual([
        ['mh-7 third.csv', first.body.traces[0].id],
        ['mh-8 twice.csv', mixed.body.traces[0].id],
      ]);
      expect(analysed).toEqual([sha(csv), sha(fresh)]);
    } finally {
      Reflect.deleteProperty(pool, 'analyse');
    }
    expect(filesIn(api, 'incoming')).toEqual([]);
  });

  it('stores the same bytes again once the earlier trace is archived, and says archived traces do not count', async () => {
    const csv = Buffer.from(stepTraceCsv({ faultM: 92, vf: 0.66 }));
    const first = await send(csv, 'pole-22.csv').expect(201);
    const blocked = await send(csv, 'pole-22.csv').expect(409);
    expect(blocked.body.error.message).toContain('Archived traces do not count as earlier uploads.');
    await tech.post(`/api/traces/${first.body.traces[0].id}/archive`, { reason: 'Shot on the wrong pair' }).expect(200);
    const again = await send(csv, 'pole-22.csv').expect(201);
    expect(again.body.duplicates).toEqual([]);
    expect(again.body.traces[0].id).not.toBe(first.body.traces[0].id);
    expect(await Trace.count({ where: { sha256: sha(csv), end: 'A' } })).toBe(2);
    // The new copy is live, so it is the one a further upload meets.
    const third = await send(csv, 'pole-22.csv').expect(409);
    expect(third.body.error.duplicates[0].traceId).toBe(again.body.traces[0].id);
  });

  it('stores the new files of a mixed upload and lists the repeated ones', async () => {
    const known = Buffer.from(stepTraceCsv({ faultM: 80, vf: 0.66 }));
    const fresh = Buffer.from(stepTraceCsv({ faultM: 85, vf: 0.66 }));
    const traces = await Trace.count();
    const earlier = await Trace.findOne({ where: { sha256: sha(known), end: 'A' } });
    const res = await tech
      .postRaw('/api/traces')
      .field('cableRunId', String(runId))
      .field('end', 'A')
      .attach('file', known, 'again.csv')
      .attach('file', fresh, 'new.csv')
      .attach('file', fresh, 'new-twice.csv')
      .expect(201);
    expect(res.body.traces.map((t: { originalName: string }) => t.originalName)).toEqual(['new.csv']);
    const stored = res.body.traces[0].id;
    expect(res.body.duplicates.map((d: { originalName: string; traceId: number }) => [d.originalName, d.traceId])).toEqual([
      ['again.csv', earlier!.id],
      ['new-twice.csv', stored],
    ]);
    expect(await Trace.count()).toBe(traces + 1);
    expect(filesIn(api, 'incoming')).toEqual([]);
  });

  it('cuts each engine warning to 300 characters where it is stored and where it is sent back', async () => {
    const up = await send(Buffer.from(stepTraceCsv({ faultM: 66, vf: 0.66 })), 'long-warning.csv').expect(201);
    const id = up.body.traces[0].id;
    const row = (await Trace.findByPk(id))!;
    // A warning as long as a quoted 5000-character header cell, stored before messages were cut.
    const quoted = `the column '${'x'.repeat(5000)}' names no unit`;
    await row.update({ analysis: { ...row.analysis!, warnings: [...row.analysis!.warnings, { code: 'TIME_UNIT_ASSUMED', message: quoted }] } });
    const got = await tech.get(`/api/traces/${id}`).expect(200);
    const shown = got.body.analysis.warnings.find((w: { code: string }) => w.code === 'TIME_UNIT_ASSUMED');
    expect(shown.message).toHaveLength(300);
    expect(shown.message).toBe(`${quoted.slice(0, 299)}…`);
    expect(got.body.analysis.warnings.every((w: { message: string }) => w.message.length <= 300)).toBe(true);
    // The same cut on the way into the store.
    const stored = boundedAnalysis({ ...row.analysis!, warnings: [{ code: 'EXTRA_COLUMNS', message: quoted }] });
    expect(stored.warnings[0].message).toBe(`${quoted.slice(0, 299)}…`);
    expect(boundedAnalysis(null)).toBeNull();
  });

  it('turns a hostile 19.5 MB one-line file into a failed trace with a short message', async () => {
    // A header, then one 19.5 MB cell on line 2: under the 20 MB upload limit.
    const hostile = Buffer.concat([Buffer.from('time_ns,voltage_V\n'), Buffer.alloc(19.5 * 1024 * 1024, '7'), Buffer.from('\n')]);
    const res = await send(hostile, 'one-line.csv').expect(422);
    expect(res.body.error.code).toBe('trace_unreadable');
    expect(res.body.error.message.length).toBeLessThanOrEqual(300);
    expect(res.body.error.fields[0].message.length).toBeLessThanOrEqual(300);
    const stored = res.body.error.traces[0];
    expect(stored.status).toBe('failed');
    expect(stored.error.line).toBe(2);
    expect(stored.error.message.length).toBeLessThanOrEqual(300);
    expect(stored.sizeBytes).toBe(hostile.length);
    expect(stored.sha256).toBe(sha(hostile));
    const row = await Trace.findByPk(stored.id);
    expect(row!.errorMessage!.length).toBeLessThanOrEqual(300);
    expect(row!.errorMessage).toBe(stored.error.message);
    const list = await tech.get('/api/traces?status=failed').expect(200);
    expect(list.body.items.every((t: { errorMessage: string }) => t.errorMessage.length <= 300)).toBe(true);
    expect(filesIn(api, 'incoming')).toEqual([]);
  }, 120_000);
});

describe('the analysis budget', () => {
  it('marks a file failed, with the reason, when its analysis runs over the time allowed', async () => {
    const api = await startApi({ analysis: { threads: 1, timeoutMs: 0, memoryMb: 256 } });
    try {
      const { run } = await makeRun('Budget run');
      const c = await api.as('technician');
      const csv = Buffer.from(stepTraceCsv({ faultM: 90, vf: 0.66 }));
      const res = await c.postRaw('/api/traces').field('cableRunId', String(run.id)).field('end', 'A').attach('file', csv, 'slow.csv').expect(422);
      const t = res.body.error.traces[0];
      expect(t.error.code).toBe('ANALYSIS_TIMEOUT');
      expect(t.error.message).toContain('took longer than the 0 s allowed for one file');
      // Kept like any unreadable file: the bytes and their SHA-256, so it can be analysed again later.
      expect(t.sha256).toBe(sha(csv));
      const row = await Trace.findByPk(t.id);
      expect([row!.status, row!.errorCode]).toEqual(['failed', 'ANALYSIS_TIMEOUT']);
      expect(fs.readFileSync(path.join(api.app.ctx.config.uploadDir, row!.rawPath)).equals(csv)).toBe(true);
    } finally {
      await api.close();
    }
  });

  it('marks a file failed, with the reason, when its analysis needs more memory than allowed', async () => {
    // 1 MB of heap is less than the engine itself needs: the worker runs out of memory on any file, and the
    // upload must still get its answer rather than wait for a worker that can never run.
    const api = await startApi({ analysis: { threads: 1, timeoutMs: 60_000, memoryMb: 1 } });
    try {
      const { run } = await makeRun('Memory run');
      const c = await api.as('technician');
      const csv = Buffer.from(stepTraceCsv({ faultM: 95, vf: 0.66 }));
      const res = await c.postRaw('/api/traces').field('cableRunId', String(run.id)).field('end', 'A').attach('file', csv, 'big.csv').expect(422);
      const t = res.body.error.traces[0];
      expect(t.error.code).toBe('ANALYSIS_MEMORY');
      expect(t.error.message).toContain('needed more than the 1 MB of memory allowed for one file');
      expect((await Trace.findByPk(t.id))!.status).toBe('failed');
      // The next file gets a fresh pool and the same clear answer, not a wait.
      const next = await c.postRaw('/api/traces').field('cableRunId', String(run.id)).field('end', 'B').attach('file', csv, 'big-b.csv').expect(422);
      expect(next.body.error.traces[0].error.code).toBe('ANALYSIS_MEMORY');
    } finally {
      await api.close();
    }
  });
});

describe('broken multipart bodies', () => {
  let api: TestApi;
  let tech: Client;
  let runId: number;
  beforeAll(async () => {
    api = await startApi();
    tech = await api.as('technician');
    runId = (await makeRun('Form run')).run.id;
  });
  afterAll(() => api?.close());

  const withBoundaryType = 'multipart/form-data; boundary=XyZ';
  const raw = (body: string, type = withBoundaryType) => tech.postRaw('/api/traces').set('content-type', type).send(Buffer.from(body));
  const part = (name: string, value: string) => `--XyZ\r\nContent-Disposition: form-data; name="${name}"\r\n\r\n${value}\r\n`;
  const filePart = (name: string, content: string) =>
    `--XyZ\r\nContent-Disposition: form-data; name="file"; filename="${name}"\r\nContent-Type: text/csv\r\n\r\n${content}\r\n`;

  const withBoundary = 'multipart/form-data; boundary=XyZ';
  it.each([
    ['a part header without a colon', `${part('end', 'A')}--XyZ\r\nContent-Disposition form-data; name="cableRunId"\r\n\r\n1\r\n--XyZ--\r\n`, withBoundary, 'Malformed part header'],
    ['a body cut off inside a file', `${part('end', 'A')}${filePart('cut.csv', '1,0.5\n2,0.5\n')}`.slice(0, -2), withBoundary, 'Unexpected end of form'],
    ['no boundary in the content type', part('end', 'A'), 'multipart/form-data', 'Boundary not found'],
  ])('answers 400 for %s and stores nothing', async (_what, body, type, words) => {
    const traces = await Trace.count();
    const res = await raw(body, type).expect(400);
    expect(res.body.error.code).toBe('malformed_form');
    expect(res.body.error.message).toContain(words);
    expect(res.body.error.message).toContain('Nothing was stored');
    expect(await Trace.count()).toBe(traces);
    expect(filesIn(api, 'incoming')).toEqual([]);
  });

  it('answers 400 naming the missing file name for a file part sent with an empty one, and stores nothing', async () => {
    const traces = await Trace.count();
    const res = await raw(`${part('cableRunId', String(runId))}${part('end', 'A')}${filePart('', '0,0.5\n'.repeat(1000))}--XyZ--\r\n`).expect(400);
    expect(res.body.error.code).toBe('file_without_name');
    expect(res.body.error.message).toMatch(/^The file part has no file name, so it was read as text; .* Nothing was stored\.$/);
    expect(res.body.error.fields).toEqual([{ field: 'file', message: 'has no file name' }]);
    expect(await Trace.count()).toBe(traces);
    expect(filesIn(api, 'incoming')).toEqual([]);
  });

  it('answers a JSON body or a body without a content type with 415 saying to send multipart/form-data', async () => {
    const traces = await Trace.count();
    const json = await tech.post('/api/traces', { cableRunId: runId, end: 'A', file: 'time_ns,voltage_V\n0,0.5\n' }).expect(415);
    expect(json.body.error.code).toBe('not_multipart');
    expect(json.body.error.message).toContain('sent as application/json');
    expect(json.body.error.message).toContain('multipart/form-data');
    expect(json.body.error.fields).toEqual([{ field: 'Content-Type', message: 'must be multipart/form-data' }]);
    const bare = await tech.postRaw('/api/traces').expect(415);
    expect(bare.body.error.message).toContain('without a content type');
    expect(await Trace.count()).toBe(traces);
  });

  it('answers 413 for a field value over the limit and 400 for too many fields or a file in the wrong field', async () => {
    const long = await raw(`${part('vfOverrideReason', 'x'.repeat(3000))}--XyZ--\r\n`).expect(413);
    expect(long.body.error.code).toBe('field_too_large');
    expect(long.body.error.message).toContain('vfOverrideReason');
    const many = await raw(`${Array.from({ length: 25 }, (_, i) => part(`f${i}`, '1')).join('')}--XyZ--\r\n`).expect(400);
    expect(many.body.error.message).toContain('too many');
    const wrong = await raw(`--XyZ\r\nContent-Disposition: form-data; name="photo"; filename="a.csv"\r\nContent-Type: text/csv\r\n\r\n1,2\r\n--XyZ--\r\n`).expect(400);
    expect(wrong.body.error.code).toBe('bad_upload');
    expect(wrong.body.error.message).toContain('photo');
    expect(filesIn(api, 'incoming')).toEqual([]);
  });

  it('refuses a NUL character in a form field or a file name', async () => {
    const traces = await Trace.count();
    const csv = Buffer.from(stepTraceCsv({ faultM: 60, vf: 0.66 }));
    const field = await tech
      .postRaw('/api/traces')
      .field('cableRunId', String(runId))
      .field('end', 'A')
      .field('vfOverride', '0.6')
      .field('vfOverrideReason', 'drum\u0000label')
      .attach('file', csv, 'nul.csv')
      .expect(400);
    expect(field.body.error.code).toBe('nul_byte');
    expect(field.body.error.fields[0].field).toBe('vfOverrideReason');
    // A NUL written as is in a part header breaks the header itself; written percent-encoded (RFC 5987) it reaches the name.
    const inHeader = await raw(`${part('cableRunId', String(runId))}${part('end', 'A')}${filePart('bad\u0000name.csv', '1,2\n')}--XyZ--\r\n`).expect(400);
    expect(inHeader.body.error.code).toBe('malformed_form');
    expect(inHeader.body.error.message).toContain('Malformed part header');
    const encoded = `--XyZ\r\nContent-Disposition: form-data; name="file"; filename*=UTF-8''bad%00name.csv\r\nContent-Type: text/csv\r\n\r\n1,2\r\n--XyZ--\r\n`;
    const name = await raw(`${part('cableRunId', String(runId))}${part('end', 'A')}${encoded}`).expect(400);
    expect(name.body.error.code).toBe('nul_byte');
    expect(name.body.error.message).toContain('file name');
    expect(await Trace.count()).toBe(traces);
    expect(filesIn(api, 'incoming')).toEqual([]);
  });
});
