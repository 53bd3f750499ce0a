import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { MailJob } from '../../server/db/models';
import { startApi, type Client, type TestApi } from './support/api';
import { closedPort, eventually } from './mail.support';

// "Try again" on a failed mail job, pressed by two people at once: the first press queues the job and
// a sender claims it (status sending, with a lease); the second press must not undo that claim, or a
// second sender would take the job while the first is still talking to the relay (the same message
// sent twice at once, which the lease exists to prevent).

let api: TestApi;
let admin: Client;

beforeAll(async () => {
  api = await startApi({ smtpUrl: `smtp://127.0.0.1:${await closedPort()}`, mailRetryBaseMs: 20, mailMaxAttempts: 1 });
  admin = await api.as('admin');
});
afterAll(() => api?.close());

async function failedJob(subject: string) {
  const job = await api.app.ctx.mail.queue.enqueue({ kind: 'test', to: ['crew@example.com'], subject, text: 'x' });
  return eventually(async () => {
    const r = await MailJob.findByPk(job!.id);
    return r?.status === 'failed' ? r : undefined;
  }, 'the job marked failed');
}

describe('trying a failed mail job again', () => {
  it('leaves a job that a sender claimed meanwhile to that sender', async () => {
    const job = await failedJob('Claimed meanwhile');
    const lease = new Date(Date.now() + 5 * 60_000);
    // Just before this request writes, a sender claims the job (as after someone else's "Try again").
    let armed = true;
    const claimFirst = async () => {
      if (!armed) return;
      armed = false;
      await MailJob.update({ status: 'sending', nextAttemptAt: lease }, { where: { id: job.id }, hooks: false });
    };
    MailJob.addHook('beforeUpdate', 'claimed-meanwhile', claimFirst);
    MailJob.addHook('beforeBulkUpdate', 'claimed-meanwhile', claimFirst);
    try {
      const res = await admin.post(`/api/outbox/queue/${job.id}/retry`).expect(409);
      expect(res.body.error.code).toBe('not_failed');
      expect(res.body.error.message).toBe(`Mail job ${job.id} is being sent now; nothing was changed.`);
    } finally {
      MailJob.removeHook('beforeUpdate', 'claimed-meanwhile');
      MailJob.removeHook('beforeBulkUpdate', 'claimed-meanwhile');
    }
    const row = await MailJob.findByPk(job.id);
    expect(row!.status).toBe('sending');
    expect(row!.nextAttemptAt.getTime()).toBe(lease.getTime());
  });

  it('queues a failed job, and refuses one already sent', async () => {
    const job = await failedJob('Sent by now');
    await MailJob.update({ status: 'sent' }, { where: { id: job.id }, hooks: false });
    const res = await admin.post(`/api/outbox/queue/${job.id}/retry`).expect(409);
    expect(res.body.error).toMatchObject({ code: 'not_failed', message: `Mail job ${job.id} was already sent; nothing was changed.` });
    expect((await MailJob.findByPk(job.id))!.status).toBe('sent');

    const other = await failedJob('Try me again');
    const again = await admin.post(`/api/outbox/queue/${other.id}/retry`).expect(200);
    expect(again.body).toMatchObject({ id: other.id, status: 'queued' });
  });

  it('answers 404 for a job that does not exist', async () => {
    const res = await admin.post('/api/outbox/queue/999999/retry').expect(404);
    expect(res.body.error.code).toBe('not_found');
  });
});
