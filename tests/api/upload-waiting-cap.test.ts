import fs from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Trace } from '../../server/db/models';
import { inboxDir } from '../../server/traces/trace-store';
import { makeRun, stepTraceCsv } from './support/field-fixtures';
import { startApi, type Client, type TestApi } from './support/api';

/**
 * The background analysis of large files has one thread for everyone. One account sending hundreds of large files
 * would hold everyone else's for hours, so each person may have at most ANALYSIS_PENDING_PER_USER waiting; an
 * upload past that is refused whole with 429, naming the limit, and stores nothing.
 */
let api: TestApi;
let runId: number;
let tech: Client;
const INLINE_MAX = 20_000;
const CAP = 2;
// 3000 samples of "t,v" text: about 60 kB, over the inline limit; 600 samples: about 12 kB, under it.
const large = (faultM: number) => stepTraceCsv({ faultM, vf: 0.66 });
const small = (faultM: number) => stepTraceCsv({ faultM, vf: 0.66, samples: 600 });

beforeAll(async () => {
  api = await startApi({
    analysisInlineMaxBytes: INLINE_MAX,
    analysisPendingPerUser: CAP,
    // A long lease: no pending trace of this test is taken up again by a periodic look while it runs.
    jobs: { maintenanceSeconds: 1, pollSeconds: 0.5, leaseSeconds: 600, shutdownGraceMs: 2000 },
  });
  runId = (await makeRun('Waiting cap run')).run.id;
  tech = await api.as('technician');
});
afterAll(() => api.close());

function upload(c: Client, end: 'A' | 'B', files: Array<[string, string]>) {
  let req = c.postRaw('/api/traces').field('cableRunId', String(runId)).field('end', end);
  for (const [name, csv] of files) req = req.attach('file', Buffer.from(csv), name);
  return req;
}

const inboxFiles = () => fs.readdirSync(inboxDir(api.app.ctx.config.uploadDir)).filter((f) => !f.startsWith('.'));

describe('large files waiting for analysis, per person', () => {
  it('refuses an upload past the limit with 429 naming it, stores nothing, and leaves small files and other people alone', async () => {
    expect(Buffer.byteLength(large(10))).toBeGreaterThan(INLINE_MAX);
    expect(Buffer.byteLength(small(10))).toBeLessThan(INLINE_MAX);
    // Two of the technician's files still waiting for their analysis (read in at once here, then set waiting).
    const first = await upload(tech, 'A', [['w1.csv', small(40)], ['w2.csv', small(45)]]).expect(201);
    const waitingIds = first.body.traces.map((t: { id: number }) => t.id) as number[];
    await Trace.update({ status: 'pending' }, { where: { id: waitingIds } });
    const before = await Trace.count();

    const refused = await upload(tech, 'A', [['long-1.csv', large(60)]]).expect(429);
    expect(refused.body.error.code).toBe('too_many_waiting');
    expect(refused.body.error.message).toBe(
      "You have 2 large files waiting for analysis; each person may have at most 2 waiting, so everyone's keep moving. " +
        "This upload's 1 large file would make 3, so nothing was stored: send it again once some of yours are analysed, or send fewer at a time.",
    );
    expect(refused.body.error.fields).toEqual([{ field: 'file', message: '1 large file over the limit of 2 waiting for analysis per person (2 waiting now)' }]);
    expect(refused.body.error.limit).toBe(2);
    expect(refused.body.error.waiting).toBe(2);
    // A small file beside it does not make it through half-stored either.
    const mixed = await upload(tech, 'B', [['short-1.csv', small(70)], ['long-2.csv', large(75)]]).expect(429);
    expect(mixed.body.error.code).toBe('too_many_waiting');
    expect(await Trace.count()).toBe(before);
    expect(inboxFiles()).toEqual([]);

    // Small files are analysed at once, as ever; someone else's large file is taken.
    const shortOnly = await upload(tech, 'B', [['short-2.csv', small(80)]]).expect(201);
    expect(shortOnly.body.traces[0].status).toBe('ok');
    const sup = await api.as('supervisor');
    const theirs = await upload(sup, 'B', [['theirs.csv', large(85)]]).expect(202);
    expect(theirs.body.traces[0].status).toBe('pending');

    // One of the technician's is analysed: one more fits, two do not.
    await Trace.update({ status: 'ok' }, { where: { id: waitingIds[0] } });
    const two = await upload(tech, 'A', [['long-3.csv', large(90)], ['long-4.csv', large(95)]]).expect(429);
    expect(two.body.error.message).toMatch(/^You have 1 large file waiting for analysis; .* This upload's 2 large files would make 3, so nothing was stored: send them again/);
    const one = await upload(tech, 'A', [['long-5.csv', large(100)]]).expect(202);
    expect(one.body.traces[0].status).toBe('pending');
    expect(await Trace.count()).toBe(before + 3);
    expect(inboxFiles()).toEqual([]);
  });
});
