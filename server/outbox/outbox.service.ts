import { Op, fn, literal, where as sqlWhere } from 'sequelize';
import type { z } from 'zod';
import type { MailJobView, MailQueueQuerySchema, OutboxMessageView, OutboxQuerySchema } from '../../shared/schemas/outbox';
import type { Page } from '../../shared/schemas/users';
import { MailJob } from '../db/models/mail-job';
import { idsContaining } from '../db/text-search';
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

/**
 * Messages whose envelope names this address exactly (one of its comma-separated recipients), by
 * position rather than LIKE so that an address holding "_" or "%" matches only itself.
 */
function sentTo(address: string, dialect: string) {
  const inList = fn(dialect === 'postgres' ? 'strpos' : 'instr', literal(`', ' || lower("envelope_to") || ','`), `, ${address.toLowerCase()},`);
  return sqlWhere(inList, Op.gt, 0);
}

/** Captured messages, newest first; with `recipient`, only those sent to that address. */
export async function listOutbox(q: z.output<typeof OutboxQuerySchema>, recipient?: string): Promise<Page<OutboxMessageView>> {
  const conditions: unknown[] = [];
  // The text as typed ("_" and "%" are no wildcards), in any case on SQLite and PostgreSQL alike.
  if (q.to) conditions.push(idsContaining(OutboxMessage, ['envelope_to'], q.to));
  if (recipient) conditions.push(sentTo(recipient, OutboxMessage.sequelize!.getDialect()));
  const where = conditions.length ? { [Op.and]: conditions } : {};
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
