import nodemailer from 'nodemailer';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { MailJob, OutboxMessage, User } from '../../server/db/models';
import { retryDelayMs } from '../../server/mail';
import type { MailJobView, OutboxMessageView } from '../../shared/schemas/outbox';
import { startApi, type TestApi } from './support/api';
import { closedPort, eventually, startFlakyRelay, type TestRelay } from './mail.support';

describe('mail through the local capture server', () => {
  let api: TestApi;
  beforeAll(async () => {
    api = await startApi();
  });
  afterAll(() => api?.close());

  it('starts a capture server on a loopback port when no relay is configured', () => {
    expect(api.app.ctx.config.smtpUrl).toBeUndefined();
    expect(api.app.ctx.mail.capturePort).toBeGreaterThan(0);
    expect(api.app.ctx.mail.mailer.describe).toBe(`capture server on 127.0.0.1:${api.app.ctx.mail.capturePort}`);
  });

  it('delivers a queued message over SMTP and shows it in GET /api/outbox', async () => {
    const job = await api.app.ctx.mail.queue.enqueue({
      kind: 'test',
      to: ['crew.one@example.com'],
      subject: 'Splice pit 4 ready',
      text: 'The pit at marker HH-4 is open.\nBring the long ladder.',
      html: '<p>The pit at marker <b>HH-4</b> is open.</p>',
    });
    expect(job).not.toBeNull();
    const admin = await api.as('admin');
    const msg = await eventually(async () => {
      const res = await admin.get('/api/outbox').expect(200);
      return (res.body.items as OutboxMessageView[]).find((m) => m.subject === 'Splice pit 4 ready');
    }, 'the message in the outbox');
    expect(msg.to).toBe('crew.one@example.com');
    expect(msg.from).toContain('rholog@example.com');
    expect(msg.body.trim()).toBe('The pit at marker HH-4 is open.\nBring the long ladder.');
    expect(msg.html).toContain('<b>HH-4</b>');
    expect(msg.headers.find((h) => h.key === 'x-rholog-mail-job')?.line).toBe(`X-Rholog-Mail-Job: ${job!.id}`);
    expect(Math.abs(Date.parse(msg.sentAt) - Date.now())).toBeLessThan(60_000);

    const row = await eventually(async () => {
      const r = await MailJob.findByPk(job!.id);
      return r?.status === 'sent' ? r : undefined;
    }, 'the job marked sent');
    expect(row.attempts).toBe(1);
    expect(row.lastError).toBeNull();
    const queue = await admin.get('/api/outbox/queue?status=sent').expect(200);
    expect((queue.body.items as MailJobView[]).map((j) => j.id)).toContain(job!.id);
  });

  it('takes mail only from a client that signs in with the credentials generated at start', async () => {
    const port = api.app.ctx.mail.capturePort!;
    const auth = api.app.ctx.mail.captureAuth!;
    expect(auth.user).toMatch(/^rholog-[0-9a-f]{12}$/);
    expect(auth.pass.length).toBeGreaterThanOrEqual(32);
    const before = await OutboxMessage.count();
    const message = { from: 'rholog@example.com', to: 'crew@example.com', subject: 'Looks like Rholog', text: 'forged' };
    const anonymous = nodemailer.createTransport({ host: '127.0.0.1', port, secure: false, ignoreTLS: true });
    // 530: authentication required (RFC 4954).
    await expect(anonymous.sendMail(message)).rejects.toMatchObject({ responseCode: 530 });
    anonymous.close();
    const guesser = nodemailer.createTransport({ host: '127.0.0.1', port, secure: false, ignoreTLS: true, auth: { user: auth.user, pass: 'not-the-password' } });
    // 535: authentication credentials invalid (RFC 4954).
    await expect(guesser.sendMail(message)).rejects.toMatchObject({ responseCode: 535 });
    guesser.close();
    expect(await OutboxMessage.count()).toBe(before);
  });

  it('stores headers, Cc and the envelope of mail from the signed-in mailer, newest first', async () => {
    const client = nodemailer.createTransport({ host: '127.0.0.1', port: api.app.ctx.mail.capturePort!, secure: false, ignoreTLS: true, auth: api.app.ctx.mail.captureAuth! });
    await client.sendMail({ from: 'a@example.com', to: 'b@example.com', cc: 'c@example.com', bcc: 'd@example.com', subject: 'First', text: 'one' });
    await client.sendMail({ from: 'a@example.com', to: 'b@example.com', subject: 'Second', text: 'two' });
    client.close();
    const admin = await api.as('admin');
    const res = await admin.get('/api/outbox?to=d@example.com').expect(200);
    expect(res.body.total).toBe(1);
    const first = res.body.items[0] as OutboxMessageView;
    expect(first.subject).toBe('First');
    expect(first.cc).toBe('c@example.com');
    // Bcc is not a header; only the envelope knows it.
    expect(first.headers.some((h) => h.key === 'bcc')).toBe(false);
    const all = await admin.get('/api/outbox?to=b@example.com').expect(200);
    expect((all.body.items as OutboxMessageView[]).map((m) => m.subject)).toEqual(['Second', 'First']);
  });

  it('writes the job in the caller’s transaction: a rolled-back change sends nothing', async () => {
    const before = await MailJob.count();
    await expect(
      api.app.ctx.sequelize.transaction(async (transaction) => {
        await api.app.ctx.mail.queue.enqueue({ kind: 'test', to: ['x@example.com'], subject: 'Never', text: 'never' }, transaction);
        throw new Error('change refused');
      }),
    ).rejects.toThrow('change refused');
    expect(await MailJob.count()).toBe(before);
  });

  it('rejects bad outbox paging with a 400 naming the field', async () => {
    const admin = await api.as('admin');
    const res = await admin.get('/api/outbox?pageSize=1000').expect(400);
    expect(res.body.error.fields[0].field).toBe('pageSize');
  });

  it('shows a supervisor the captured mail sent to their own address only; the whole outbox stays with administrators', async () => {
    const supervisor = await api.as('supervisor');
    const me = 'supervisor.test@example.com';
    const client = nodemailer.createTransport({ host: '127.0.0.1', port: api.app.ctx.mail.capturePort!, secure: false, ignoreTLS: true, auth: api.app.ctx.mail.captureAuth! });
    await client.sendMail({ from: 'rholog@example.com', to: me, subject: 'Fault confirmed on pair P-12', text: 'mine' });
    await client.sendMail({ from: 'rholog@example.com', to: 'crew.two@example.com', cc: me.toUpperCase(), subject: 'Ticket 40 assigned', text: 'copied to me' });
    // Addresses that hold "supervisor.test@example.com" inside them, and one that differs only where another has "_", are not this supervisor's.
    await client.sendMail({ from: 'rholog@example.com', to: `x${me}`, subject: 'Not mine: longer address', text: 'no' });
    await client.sendMail({ from: 'rholog@example.com', to: 'supervisor_test@example.com', subject: 'Not mine: underscore', text: 'no' });
    await client.sendMail({ from: 'rholog@example.com', to: 'other.site@example.com', subject: 'Not mine: another site', text: 'no' });
    client.close();
    await eventually(async () => ((await OutboxMessage.count({ where: { subject: 'Not mine: another site' } })) === 1 ? true : undefined), 'the last message captured');

    const res = await supervisor.get('/api/outbox/mine').expect(200);
    expect((res.body.items as OutboxMessageView[]).map((m) => m.subject)).toEqual(['Ticket 40 assigned', 'Fault confirmed on pair P-12']);
    expect(res.body.total).toBe(2);
    // The whole outbox and the send queue are not theirs to read; a technician has no mail view at all.
    expect((await supervisor.get('/api/outbox')).status).toBe(403);
    expect((await supervisor.get('/api/outbox/queue')).status).toBe(403);
    expect((await (await api.as('technician')).get('/api/outbox/mine')).status).toBe(403);
    const admin = await api.as('admin');
    const all = await admin.get('/api/outbox?to=example.com&pageSize=100').expect(200);
    expect((all.body.items as OutboxMessageView[]).map((m) => m.subject)).toEqual(expect.arrayContaining(['Not mine: underscore', 'Not mine: longer address']));
  });
});

describe('mail through a relay that fails', () => {
  let relay: TestRelay;
  let api: TestApi;
  beforeAll(async () => {
    relay = await startFlakyRelay(2);
    api = await startApi({ smtpUrl: relay.url, mailRetryBaseMs: 40, mailMaxAttempts: 5 });
  });
  afterAll(async () => {
    await api?.close();
    await relay?.close();
  });

  it('does not start the capture server when SMTP_URL is set', () => {
    expect(api.app.ctx.mail.capturePort).toBeNull();
  });

  it('retries with back-off until the relay accepts, keeping the change and the error', async () => {
    const tx = await api.app.ctx.sequelize.transaction();
    const user = await User.create({ email: 'new.crew@example.com', name: 'New Crew', role: 'technician', passwordHash: 'x' }, { transaction: tx });
    const job = await api.app.ctx.mail.queue.enqueue({ kind: 'test', to: ['new.crew@example.com'], subject: 'Welcome', text: 'hello' }, tx);
    await tx.commit();

    const afterFirst = await eventually(async () => {
      const r = await MailJob.findByPk(job!.id);
      return r && r.attempts >= 1 ? r : undefined;
    }, 'the first try');
    expect(afterFirst.lastError).toContain('Relay busy, try later');

    const sent = await eventually(async () => {
      const r = await MailJob.findByPk(job!.id);
      return r?.status === 'sent' ? r : undefined;
    }, 'the job sent on the third try');
    expect(sent.attempts).toBe(3);
    expect(relay.refused).toBe(2);
    expect(relay.received.map((m) => m.subject)).toEqual(['Welcome']);
    // The business change was committed whatever the relay said.
    expect((await User.findByPk(user.id))?.email).toBe('new.crew@example.com');
  });
});

describe('mail to a relay that is not there', () => {
  let api: TestApi;
  beforeAll(async () => {
    api = await startApi({ smtpUrl: `smtp://127.0.0.1:${await closedPort()}`, mailRetryBaseMs: 20, mailMaxAttempts: 3 });
  });
  afterAll(() => api?.close());

  it('gives up after the configured tries and marks the job failed with the reason', async () => {
    const job = await api.app.ctx.mail.queue.enqueue({ kind: 'test', to: ['nobody@example.com'], subject: 'Lost', text: 'x' });
    const failed = await eventually(async () => {
      const r = await MailJob.findByPk(job!.id);
      return r?.status === 'failed' ? r : undefined;
    }, 'the job marked failed');
    expect(failed.attempts).toBe(3);
    expect(failed.lastError).toMatch(/ECONNREFUSED|connect/i);
    const admin = await api.as('admin');
    const res = await admin.get('/api/outbox/queue?status=failed').expect(200);
    expect(res.body.items[0]).toMatchObject({ id: job!.id, status: 'failed', attempts: 3 });
    const again = await admin.post(`/api/outbox/queue/${job!.id}/retry`).expect(200);
    expect(again.body.status).toBe('queued');
  });
});

describe('retry back-off', () => {
  it('doubles from the base and stops at one hour', () => {
    // Hand-worked: base 30 s → 30, 60, 120, 240 s; 30 s · 2^7 = 3840 s is over the 3600 s cap.
    expect([1, 2, 3, 4].map((n) => retryDelayMs(n, 30_000))).toEqual([30_000, 60_000, 120_000, 240_000]);
    expect(retryDelayMs(8, 30_000)).toBe(3_600_000);
  });
});
