import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { MailJob, OutboxMessage } from '../../server/db/models';
import { messageIdDomain, messageIdOf } from '../../server/mail';
import { startApi, type TestApi } from './support/api';
import { eventually, startFlakyRelay, type TestRelay } from './mail.support';

/** RFC 5322 §3.6.4 msg-id: "<" id-left "@" id-right ">". */
const MSG_ID = /^<[^<>@\s]+@[^<>@\s]+>$/;

describe('one Message-ID per notification, kept across tries', () => {
  let api: TestApi;
  let relay: TestRelay;
  beforeAll(async () => {
    relay = await startFlakyRelay(0);
    api = await startApi({ smtpUrl: relay.url, mailRetryBaseMs: 40, mailMaxAttempts: 3 });
  });
  afterAll(async () => {
    await api?.close();
    await relay?.close();
  });

  it('takes the Message-ID domain from the sender address', () => {
    expect(messageIdDomain('Rholog <rholog@example.com>')).toBe('example.com');
    expect(messageIdDomain('alerts@Field.Example.org')).toBe('field.example.org');
    expect(messageIdDomain('no address')).toBe('rholog.invalid');
  });

  it('sends a retry with the same Message-ID when the relay took the first copy but the answer was lost', async () => {
    const mailer = api.app.ctx.mail.mailer;
    const send = mailer.send;
    let calls = 0;
    mailer.send = async (mail) => {
      const info = await send(mail);
      calls += 1;
      if (calls === 1) throw new Error('connection reset after the relay accepted the message');
      return info;
    };
    try {
      const job = await api.app.ctx.mail.queue.enqueue({
        kind: 'test',
        to: ['crew.two@example.com'],
        subject: 'Pit 7 open',
        text: 'Bring cones.',
      });
      expect(job!.messageId).toMatch(MSG_ID);
      expect(job!.messageId!.endsWith('@example.com>')).toBe(true);
      const sent = await eventually(async () => {
        const r = await MailJob.findByPk(job!.id);
        return r?.status === 'sent' ? r : undefined;
      }, 'the job sent on its second try');
      expect(sent.attempts).toBe(2);
      expect(sent.messageId).toBe(job!.messageId);
      const copies = relay.received.filter((m) => m.subject === 'Pit 7 open');
      // Both copies reached the relay (the at-least-once window), with one Message-ID a receiver can drop the repeat by.
      expect(copies.map((m) => m.messageId)).toEqual([job!.messageId, job!.messageId]);
    } finally {
      mailer.send = send;
    }
  });

  it('leaves a job another instance is sending alone until its lease ends, then sends it with the same Message-ID', async () => {
    const held = await api.app.ctx.mail.queue.enqueue({
      kind: 'test',
      to: ['crew.three@example.com'],
      subject: 'Held',
      text: 'x',
    });
    // As if another instance claimed it and is still within its lease (it may be talking to the relay right now).
    await MailJob.update(
      { status: 'sending', attempts: 0, nextAttemptAt: new Date(Date.now() + 60_000) },
      { where: { id: held!.id } },
    );
    const other = await api.app.ctx.mail.queue.enqueue({
      kind: 'test',
      to: ['crew.four@example.com'],
      subject: 'Not held',
      text: 'y',
    });
    await eventually(async () => (await MailJob.findByPk(other!.id))?.status === 'sent', 'the other job sent');
    const still = await MailJob.findByPk(held!.id);
    expect([still!.status, still!.attempts]).toEqual(['sending', 0]);
    expect(relay.received.filter((m) => m.subject === 'Held')).toEqual([]);

    // That instance died: its lease ends, and the job is sent again under the Message-ID it already had (the lost try counts).
    await MailJob.update({ nextAttemptAt: new Date(Date.now() - 1000) }, { where: { id: held!.id } });
    api.app.ctx.mail.queue.kick();
    const sent = await eventually(async () => {
      const r = await MailJob.findByPk(held!.id);
      return r?.status === 'sent' ? r : undefined;
    }, 'the held job sent after its lease ended');
    expect(sent.attempts).toBe(2);
    expect(relay.received.filter((m) => m.subject === 'Held').map((m) => m.messageId)).toEqual([held!.messageId]);
  });

  it('marks failed, without sending again, a job whose last try was lost with its instance', async () => {
    const job = await api.app.ctx.mail.queue.enqueue({
      kind: 'test',
      to: ['crew.five@example.com'],
      subject: 'Last try lost',
      text: 'z',
    });
    // Two tries failed; the third (the last of 3) was being sent when its instance died.
    await MailJob.update(
      { status: 'sending', attempts: 2, nextAttemptAt: new Date(Date.now() - 1000) },
      { where: { id: job!.id } },
    );
    api.app.ctx.mail.queue.kick();
    const failed = await eventually(async () => {
      const r = await MailJob.findByPk(job!.id);
      return r?.status === 'failed' ? r : undefined;
    }, 'the job marked failed');
    expect(failed.attempts).toBe(3);
    expect(failed.lastError).toMatch(/may or may not have taken it/);
    expect(relay.received.filter((m) => m.subject === 'Last try lost')).toEqual([]);
  });

  it('gives a job queued before Message-IDs were kept one made from its row, the same on every instance', async () => {
    const job = await api.app.ctx.mail.queue.enqueue({
      kind: 'test',
      to: ['crew.six@example.com'],
      subject: 'Old row',
      text: 'w',
    });
    const row = await MailJob.findByPk(job!.id);
    const made = messageIdOf({ id: row!.id, createdAt: row!.createdAt, messageId: null }, 'example.com');
    expect(made).toBe(`<mail.${row!.id}.${row!.createdAt.getTime()}@example.com>`);
    expect(made).toMatch(MSG_ID);
  });
});

describe('the capture server as a receiver', () => {
  let api: TestApi;
  beforeAll(async () => {
    api = await startApi();
  });
  afterAll(() => api?.close());

  it('keeps one copy of a notification delivered twice under one Message-ID', async () => {
    const mailer = api.app.ctx.mail.mailer;
    const one = {
      to: 'crew.seven@example.com',
      subject: 'Twice',
      text: 'Same notification.',
      messageId: '<repeat-test-1@example.com>',
    };
    await mailer.send(one);
    await mailer.send(one);
    await mailer.send({ ...one, messageId: '<repeat-test-2@example.com>' });
    const stored = await OutboxMessage.findAll({ where: { subject: 'Twice' }, order: [['id', 'ASC']] });
    expect(stored.map((m) => m.messageId)).toEqual(['<repeat-test-1@example.com>', '<repeat-test-2@example.com>']);
  });
});
