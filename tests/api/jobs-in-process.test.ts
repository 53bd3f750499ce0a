import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { InProcessQueue } from '../../server/jobs/in-process-queue';
import { eventually } from './mail.support';
import { startApi, type TestApi, isPostgres } from './support/api';
import { captureLog } from './support/log-capture';
import { makeRun, stepTraceCsv } from './support/field-fixtures';

describe('the in-process job queue', () => {
  it('holds a job only until it has finished, keeping a retrying one, and still says how recent ones ended', async () => {
    const q = new InProcessQueue();
    const tries = new Map<number, number>();
    await q.define<{ n: number }>('count', { retryLimit: 2, retryDelaySeconds: 0.05, leaseSeconds: 30 }, async ({ n }) => {
      tries.set(n, (tries.get(n) ?? 0) + 1);
      // Job 7 fails on its first try; the queue must keep it for the retry.
      if (n === 7 && tries.get(n) === 1) throw new Error('not yet');
    });
    await q.define('hopeless', { retryLimit: 0, retryDelaySeconds: 0.05, leaseSeconds: 30 }, async () => {
      throw new Error('never works');
    });
    const ids = await Promise.all(Array.from({ length: 50 }, (_, n) => q.send('count', { n })));
    const lost = await q.send('hopeless', {});
    await eventually(async () => (await q.state('count', ids[7])) === 'retrying', 'job 7 to wait for its retry');
    expect(q.held).toBeGreaterThanOrEqual(1);
    await eventually(async () => q.held === 0, 'every job to finish');
    expect(await q.state('count', ids[7])).toBe('done');
    expect(await q.state('count', ids[49])).toBe('done');
    expect(await q.state('hopeless', lost)).toBe('failed');
    expect(tries.get(7)).toBe(2);
    expect([...tries.values()].reduce((a, b) => a + b, 0)).toBe(51);
    await q.stop(1000);
  });
});

/** The in-process queue runs the jobs on SQLite, pg-boss on PostgreSQL: each run logs with its own ids either way. */
describe(`background job log lines (${isPostgres ? 'pg-boss' : 'in-process queue'})`, () => {
  let api: TestApi;
  const log = captureLog();
  beforeAll(async () => {
    api = await startApi(
      { logLevel: 'info', analysisInlineMaxBytes: 20_000, jobs: { maintenanceSeconds: 1, pollSeconds: 0.5, leaseSeconds: 30, shutdownGraceMs: 2000 } },
      { logDestination: log.stream },
    );
  });
  afterAll(() => api.close());

  it('carry the run’s own ids, not the id of the upload that queued the job', async () => {
    const runId = (await makeRun()).run.id;
    const c = await api.as('technician');
    const res = await c
      .postRaw('/api/traces')
      .set('X-Request-Id', 'upload-request-0001')
      .field('cableRunId', String(runId))
      .field('end', 'A')
      .attach('file', Buffer.from(stepTraceCsv({ faultM: 120, vf: 0.66 })), 'long.csv')
      .expect(202);
    expect(res.headers['x-request-id']).toBe('upload-request-0001');
    const id = res.body.traces[0].id as number;
    const line = await eventually(
      async () => log.lines.find((l) => typeof l.msg === 'string' && l.msg.startsWith(`trace ${id} analysed in the background`)),
      'the background analysis to log',
      30_000,
    );
    expect(line.requestId).toBeUndefined();
    expect(line.job).toBe('trace-analysis');
    expect(line.jobId).toEqual(expect.any(String));
    expect(line.jobRunId).toMatch(/^[0-9a-f-]{36}$/);
  });
});
