import { randomUUID } from 'node:crypto';
import { Op, type Transaction } from 'sequelize';
import { MailJob } from '../db/models/mail-job';
import type { Mailer } from './mailer';

export interface MailJobInput {
  kind: string;
  to: string[];
  subject: string;
  text: string;
  html?: string | null;
  ticketId?: number | null;
  findingId?: number | null;
}

export interface MailQueueOptions {
  /** First retry after this long; each later one waits twice as long as the one before. */
  retryBaseMs: number;
  /** After this many failed tries the job is marked failed and left alone. */
  maxAttempts: number;
  log: (message: string) => void;
  /** Longest sleep between looks at the table (jobs are normally picked up at once via kick()). */
  pollMs?: number;
  /** How long a claimed job is held by the instance sending it; if that instance dies, the job is due again after this. */
  leaseMs?: number;
  /** The domain part of the Message-IDs (the sender address's domain). */
  messageIdDomain?: string;
}

/** The domain of a From address such as "Rholog <rholog@example.com>", for Message-IDs. */
export function messageIdDomain(from: string): string {
  const m = /@([A-Za-z0-9.-]+)>?\s*$/.exec(from.trim());
  return m ? m[1].toLowerCase() : 'rholog.invalid';
}

/**
 * The Message-ID of a queued notification: made once and kept on the row, so
 * every try (a retry, or a resend after an instance died mid-send) carries
 * the same one and a receiver can recognise the repeat (RFC 5322 §3.6.4).
 * Rows queued before Message-IDs were kept get one made from their own id and
 * creation time, the same whichever instance makes it.
 */
export function newMessageId(domain: string): string {
  return `<${randomUUID()}@${domain}>`;
}
export function messageIdOf(job: Pick<MailJob, 'id' | 'createdAt' | 'messageId'>, domain: string): string {
  return job.messageId ?? `<mail.${job.id}.${job.createdAt.getTime()}@${domain}>`;
}

const MAX_DELAY_MS = 60 * 60 * 1000;

/** Exponential back-off: base, 2·base, 4·base, … capped at one hour. */
export function retryDelayMs(attemptsSoFar: number, baseMs: number): number {
  return Math.min(MAX_DELAY_MS, baseMs * 2 ** Math.max(0, attemptsSoFar - 1));
}

/**
 * The durable send queue. enqueue() writes a mail_jobs row (inside the
 * caller's transaction when given one) and wakes the worker after commit;
 * the worker sends due jobs one by one and records each outcome on the row.
 */
export class MailQueue {
  private timer: NodeJS.Timeout | undefined;
  private current: Promise<void> | undefined;
  private again = false;
  private stopped = false;
  private readonly pollMs: number;
  private readonly leaseMs: number;
  private readonly domain: string;

  constructor(
    private readonly mailer: Mailer,
    private readonly options: MailQueueOptions,
  ) {
    this.pollMs = options.pollMs ?? 30_000;
    this.leaseMs = options.leaseMs ?? 5 * 60_000;
    this.domain = options.messageIdDomain ?? 'rholog.invalid';
  }

  start() {
    this.schedule(0);
  }

  async enqueue(input: MailJobInput, transaction?: Transaction): Promise<MailJob | null> {
    const to = [...new Set(input.to.map((a) => a.trim()).filter(Boolean))];
    if (to.length === 0) return null;
    const job = await MailJob.create(
      {
        kind: input.kind,
        toAddresses: to.join(', '),
        subject: input.subject,
        text: input.text,
        html: input.html ?? null,
        nextAttemptAt: new Date(),
        messageId: newMessageId(this.domain),
        ticketId: input.ticketId ?? null,
        findingId: input.findingId ?? null,
      },
      { transaction },
    );
    if (transaction) transaction.afterCommit(() => this.kick());
    else this.kick();
    return job;
  }

  /**
   * Try a failed job again now. One conditional UPDATE, as a claim is: a job that is no longer failed
   * (sent, queued, or claimed by a sender meanwhile, e.g. after someone else's retry) is left as it is,
   * so its lease is never undone. `retried` says whether this call queued it.
   */
  async retry(jobId: number): Promise<{ job: MailJob | null; retried: boolean }> {
    const [count] = await MailJob.update({ status: 'queued', nextAttemptAt: new Date() }, { where: { id: jobId, status: 'failed' } });
    const job = await MailJob.findByPk(jobId);
    if (count === 1) this.kick();
    return { job, retried: count === 1 };
  }

  kick() {
    this.schedule(0);
  }

  async stop() {
    this.stopped = true;
    if (this.timer) clearTimeout(this.timer);
    this.timer = undefined;
    await this.current;
  }

  private schedule(delayMs: number) {
    if (this.stopped) return;
    if (this.timer) clearTimeout(this.timer);
    this.timer = setTimeout(() => this.tick(), Math.max(0, delayMs));
    this.timer.unref();
  }

  private tick() {
    this.timer = undefined;
    if (this.stopped) return;
    if (this.current) {
      this.again = true;
      return;
    }
    this.current = this.drain()
      .then((nextDelay) => {
        this.current = undefined;
        if (this.again) {
          this.again = false;
          this.schedule(0);
        } else {
          this.schedule(nextDelay);
        }
      })
      .catch((err: Error) => {
        this.current = undefined;
        this.options.log(`mail queue: ${err.message}`);
        this.schedule(this.pollMs);
      });
  }

  /** Send everything due; answer how long until the next job falls due. */
  private async drain(): Promise<number> {
    for (;;) {
      if (this.stopped) return this.pollMs;
      // Queued and due, or being sent by an instance whose lease ran out (it died mid-send).
      const due = await MailJob.findAll({
        where: { status: ['queued', 'sending'], nextAttemptAt: { [Op.lte]: new Date() } },
        order: [
          ['nextAttemptAt', 'ASC'],
          ['id', 'ASC'],
        ],
        limit: 20,
      });
      if (due.length === 0) break;
      for (const job of due) {
        if (this.stopped) return this.pollMs;
        if (await this.claim(job)) await this.sendOne(job);
      }
    }
    const next = await MailJob.findOne({ where: { status: ['queued', 'sending'] }, order: [['nextAttemptAt', 'ASC']] });
    if (!next) return this.pollMs;
    return Math.min(this.pollMs, next.nextAttemptAt.getTime() - Date.now());
  }

  /**
   * Take a due job for this instance: one conditional UPDATE marks it
   * 'sending' and sets the lease (nextAttemptAt) before any byte goes to the
   * relay. Several instances may read the same due row, but the database
   * applies the updates one after another and only the first still finds it
   * as read, so exactly one instance sends it. An instance that dies while
   * sending leaves the row 'sending' until the lease ends; only then is it
   * due again, with the same Message-ID, and the lost try counts as one. A
   * job whose last try was lost that way is marked failed instead: the relay
   * may or may not have it.
   */
  private async claim(job: MailJob): Promise<boolean> {
    const now = new Date();
    const attempts = job.status === 'sending' ? job.attempts + 1 : job.attempts;
    const asRead = { id: job.id, status: job.status, attempts: job.attempts, nextAttemptAt: { [Op.lte]: now } };
    if (job.status === 'sending' && attempts >= this.options.maxAttempts) {
      await MailJob.update(
        {
          status: 'failed',
          attempts,
          lastError:
            'The server sending it stopped during the last try; the relay may or may not have taken it (check before sending it again).',
        },
        { where: asRead },
      );
      return false;
    }
    const messageId = messageIdOf(job, this.domain);
    const [count] = await MailJob.update(
      { status: 'sending', attempts, lastAttemptAt: now, nextAttemptAt: new Date(now.getTime() + this.leaseMs), messageId },
      { where: asRead },
    );
    if (count !== 1) return false;
    if (job.status === 'sending')
      this.options.log(`mail job ${job.id}: its sender stopped mid-send; sending it again with the same Message-ID ${messageId}`);
    Object.assign(job, { status: 'sending', attempts, lastAttemptAt: now, messageId });
    return true;
  }

  private async sendOne(job: MailJob) {
    const attempts = job.attempts + 1;
    const at = job.lastAttemptAt ?? new Date();
    try {
      await this.mailer.send({
        to: job.toAddresses,
        subject: job.subject,
        text: job.text,
        html: job.html,
        headers: { 'X-Rholog-Mail-Job': String(job.id) },
        messageId: job.messageId ?? undefined,
      });
      await MailJob.update({ status: 'sent', attempts, sentAt: new Date() }, { where: { id: job.id } });
    } catch (err) {
      const message = (err as Error).message || String(err);
      const giveUp = attempts >= this.options.maxAttempts;
      // Only while still ours: if the lease ran out and another instance took the job over, its outcome stands.
      await MailJob.update(
        {
          status: giveUp ? 'failed' : 'queued',
          attempts,
          lastError: message.slice(0, 2000),
          nextAttemptAt: new Date(at.getTime() + retryDelayMs(attempts, this.options.retryBaseMs)),
        },
        { where: { id: job.id, status: 'sending', attempts: job.attempts } },
      );
      this.options.log(
        `mail job ${job.id} to ${job.toAddresses} failed (try ${attempts} of ${this.options.maxAttempts}${giveUp ? ', giving up' : ''}): ${message}`,
      );
    }
  }
}
