import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { MailJob, OutboxMessage } from '../../server/db/models';
import { JobReleased, retryDelaySeconds } from '../../server/jobs';
import { InProcessQueue } from '../../server/jobs/in-process-queue';
import { PgBossQueue } from '../../server/jobs/pg-boss-queue';
import { MailQueue } from '../../server/mail';
import { startApi, type TestApi, isPostgres } from './support/api';
import { eventually } from './mail.support';


describe('background jobs', () => {
  let api: TestApi;
  beforeAll(async () => {
    api = await startApi({ jobs: { maintenanceSeconds: 1, pollSeconds: 0.5, leaseSeconds: 30, shutdownGraceMs: 2000 } });
  });
  afterAll(() => api?.close());

  it('uses the queue that keeps its jobs where the data is', () => {
    expect(api.app.ctx.jobs.engine).toBe(isPostgres ? 'pg-boss' : 'in-process');
  });

  it('doubles the retry delay each time, capped at an hour (common practice: exponential back-off)', () => {
    expect([0, 1, 2, 3].map((n) => retryDelaySeconds(n, 5))).toEqual([5, 10, 20, 40]);
    expect(retryDelaySeconds(20, 5)).toBe(3600);
  });

  it('runs a job once, and runs a failed one again until it succeeds', async () => {
    const seen: Array<{ id: string; value: number }> = [];
    let failuresLeft = 1;
    await api.app.ctx.jobs.define<{ value: number }>('test-flaky', { retryLimit: 3, retryDelaySeconds: 1, leaseSeconds: 30 }, async (data, job) => {
      seen.push({ id: job.id, value: data.value });
      if (failuresLeft-- > 0) throw new Error('relay not answering');
    });
    const id = await api.app.ctx.jobs.send('test-flaky', { value: 42 });
    await eventually(async () => (await api.app.ctx.jobs.state('test-flaky', id)) === 'done', 'the job to succeed on its second try', 20_000);
    expect(seen).toEqual([
      { id, value: 42 },
      { id, value: 42 },
    ]);
  });

  it('marks a job failed after its last retry', async () => {
    let tries = 0;
    await api.app.ctx.jobs.define('test-hopeless', { retryLimit: 1, retryDelaySeconds: 1, leaseSeconds: 30 }, async () => {
      tries += 1;
      throw new Error('never works');
    });
    const id = await api.app.ctx.jobs.send('test-hopeless', {});
    await eventually(async () => (await api.app.ctx.jobs.state('test-hopeless', id)) === 'failed', 'the job to fail for good', 20_000);
    expect(tries).toBe(2);
  });

  it('sends each due mail once when two workers drain the same table', async () => {
    const { mailer } = api.app.ctx.mail;
    const log = () => undefined;
    const a = new MailQueue(mailer, { retryBaseMs: 1000, maxAttempts: 3, log });
    const b = new MailQueue(mailer, { retryBaseMs: 1000, maxAttempts: 3, log });
    const jobs: MailJob[] = [];
    for (let i = 0; i < 20; i++) {
      jobs.push((await a.enqueue({ kind: 'test', to: ['crew.two@example.com'], subject: `Burst ${i}`, text: `Message ${i}` }))!);
    }
    a.start();
    b.start();
    b.kick();
    const ids = jobs.map((j) => j.id);
    await eventually(async () => (await MailJob.count({ where: { id: ids, status: 'sent' } })) === 20, 'all 20 sent', 20_000);
    await Promise.all([a.stop(), b.stop()]);
    const got = await OutboxMessage.findAll({ where: {} });
    const perJob = new Map<string, number>();
    for (const m of got) {
      const job = /X-Rholog-Mail-Job: (\d+)/i.exec(m.headers)?.[1];
      if (job && ids.includes(Number(job))) perJob.set(job, (perJob.get(job) ?? 0) + 1);
    }
    expect(perJob.size).toBe(20);
    expect([...perJob.values()].every((n) => n === 1)).toBe(true);
    expect((await MailJob.findAll({ where: { id: ids } })).map((j) => j.attempts)).toEqual(ids.map(() => 1));
  });
});

describe.runIf(isPostgres)('pg-boss across two instances', () => {
  let api: TestApi;
  beforeAll(async () => {
    api = await startApi();
  });
  afterAll(() => api?.close());

  it('hands a job that outlasts a stopping instance to the other one, which finishes it', async () => {
    const options = { connectionString: api.app.ctx.config.databaseUrl, maintenanceSeconds: 1, pollSeconds: 0.5, log: () => undefined };
    const kind = { retryLimit: 2, retryDelaySeconds: 1, leaseSeconds: 60 };
    const first = await PgBossQueue.start(options);
    const second = await PgBossQueue.start(options);
    const ranOn: string[] = [];
    try {
      await first.define('test-handover', kind, async (_data, job) => {
        ranOn.push('first');
        await new Promise<void>((resolve) => job.signal.addEventListener('abort', () => resolve()));
        throw new JobReleased();
      });
      const id = await first.send('test-handover', { step: 1 });
      await eventually(async () => (await first.state('test-handover', id)) === 'running', 'the first instance to take the job', 20_000);
      await first.stop(1000);
      await second.define('test-handover', kind, async () => {
        ranOn.push('second');
      });
      await eventually(async () => (await second.state('test-handover', id)) === 'done', 'the second instance to finish it', 30_000);
      expect(ranOn).toEqual(['first', 'second']);
    } finally {
      await first.stop(1000);
      await second.stop(1000);
    }
  });
});

describe('the in-process queue', () => {
  it('waits for a running job on stop, and calls off one that outlasts the grace period', async () => {
    const q = new InProcessQueue();
    const finished: string[] = [];
    let release!: () => void;
    const gate = new Promise<void>((r) => (release = r));
    await q.define('short', { retryLimit: 0, retryDelaySeconds: 1, leaseSeconds: 30 }, async () => {
      await gate;
      finished.push('short');
    });
    const id = await q.send('short', {});
    await eventually(async () => (await q.state('short', id)) === 'running', 'the job to start');
    const stopping = q.stop(5_000);
    release();
    await stopping;
    expect(finished).toEqual(['short']);
    expect(await q.state('short', id)).toBe('done');

    const q2 = new InProcessQueue();
    await q2.define('long', { retryLimit: 0, retryDelaySeconds: 1, leaseSeconds: 30 }, async (_data, job) => {
      await new Promise<void>((resolve) => job.signal.addEventListener('abort', () => resolve()));
      throw new JobReleased();
    });
    const longId = await q2.send('long', {});
    await eventually(async () => (await q2.state('long', longId)) === 'running', 'the long job to start');
    await q2.stop(50);
    // Handed back, not failed: a restarted instance (or the record it keeps) takes it up again.
    expect(await q2.state('long', longId)).toBe('waiting');
  });
});
