import { Op } from 'sequelize';
import type { z } from 'zod';
import type { MailJobView, MailQueueQuerySchema, OutboxMessageView, OutboxQuerySchema } from '../../shared/schemas/outbox';
import type { Page } from '../../shared/schemas/users';
import { MailJob } from '../db/models/mail-job';
import { OutboxMessage } from '../db/models/outbox-message';

function parseHeaders(json: string): OutboxMessageView['headers'] {
  try {
    const v = JSON.parse(json) as unknown;
    return Array.isArray(v) ? (v as OutboxMessageView['headers']) : [];
  } catch {
    return [];
  }
}

export function outboxView(m: OutboxMessage): OutboxMessageView {
  return {
    id: m.id,
    messageId: m.messageId,
    from: m.fromAddress,
    to: m.toAddresses,
    cc: m.ccAddresses,
    subject: m.subject,
    sentAt: m.sentAt.toISOString(),
    receivedAt: m.receivedAt.toISOString(),
    body: m.text ?? '',
    html: m.html,
    headers: parseHeaders(m.headers),
  };
}

export function mailJobView(j: MailJob): MailJobView {
  return {
    id: j.id,
    kind: j.kind,
    to: j.toAddresses,
    subject: j.subject,
    status: j.status,
    attempts: j.attempts,
    nextAttemptAt: j.status === 'queued' ? j.nextAttemptAt.toISOString() : null,
    lastAttemptAt: j.lastAttemptAt ? j.lastAttemptAt.toISOString() : null,
    lastError: j.lastError,
    sentAt: j.sentAt ? j.sentAt.toISOString() : null,
    ticketId: j.ticketId,
    findingId: j.findingId,
    createdAt: j.createdAt.toISOString(),
  };
}

/** Captured messages, newest first. */
export async function listOutbox(q: z.output<typeof OutboxQuerySchema>): Promise<Page<OutboxMessageView>> {
  const where = q.to ? { envelopeTo: { [Op.like]: `%${q.to.toLowerCase()}%` } } : {};
  const { rows, count } = await OutboxMessage.findAndCountAll({
    where,
    order: [
      ['receivedAt', 'DESC'],
      ['id', 'DESC'],
    ],
    limit: q.pageSize,
    offset: (q.page - 1) * q.pageSize,
  });
  return { items: rows.map(outboxView), total: count, page: q.page, pageSize: q.pageSize };
}

/** The send queue, newest first, for seeing what is stuck. */
export async function listMailJobs(q: z.output<typeof MailQueueQuerySchema>): Promise<Page<MailJobView>> {
  const { rows, count } = await MailJob.findAndCountAll({
    where: q.status ? { status: q.status } : {},
    order: [['id', 'DESC']],
    limit: q.pageSize,
    offset: (q.page - 1) * q.pageSize,
  });
  return { items: rows.map(mailJobView), total: count, page: q.page, pageSize: q.pageSize };
}
