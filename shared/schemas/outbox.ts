import { z } from 'zod';
import { textInt } from './input';

export const OutboxQuerySchema = z.strictObject({
  to: z.string().trim().max(254).optional(),
  page: textInt({ min: 1, max: 1_000_000, what: 'a page number' }).default(1),
  pageSize: textInt({ min: 1, max: 100, what: 'a page size' }).default(25),
});

export const MailQueueQuerySchema = z.strictObject({
  status: z.enum(['queued', 'sending', 'sent', 'failed'], { error: 'must be queued, sending, sent or failed' }).optional(),
  page: textInt({ min: 1, max: 1_000_000, what: 'a page number' }).default(1),
  pageSize: textInt({ min: 1, max: 100, what: 'a page size' }).default(25),
});

export interface OutboxHeader {
  key: string;
  line: string;
}

/** A message as the capture server stored it. */
export interface OutboxMessageView {
  id: number;
  messageId: string | null;
  from: string;
  to: string;
  cc: string | null;
  subject: string;
  sentAt: string;
  receivedAt: string;
  /** The plain-text body. */
  body: string;
  html: string | null;
  headers: OutboxHeader[];
}

/** 'sending': an instance is handing it to the relay (until the lease in nextAttemptAt ends). */
export type MailJobStatus = 'queued' | 'sending' | 'sent' | 'failed';

/** One entry of the send queue: what was (or will be) sent and how it went. */
export interface MailJobView {
  id: number;
  kind: string;
  to: string;
  subject: string;
  status: MailJobStatus;
  attempts: number;
  nextAttemptAt: string | null;
  lastAttemptAt: string | null;
  lastError: string | null;
  sentAt: string | null;
  ticketId: number | null;
  findingId: number | null;
  createdAt: string;
}
