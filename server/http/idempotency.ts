import { createHash } from 'node:crypto';
import type { Request, Response } from 'express';
import { Op, type Transaction } from 'sequelize';
import { IDEMPOTENCY_KEY } from '../../shared/schemas/traces';
import { RequestReceipt } from '../db/models';
import { AppError } from '../errors';
import type { Logger } from '../log';

/**
 * The optional Idempotency-Key header. The client makes one per thing it
 * sends (a file, a decision, a reading, a close-out) and sends the same key
 * on every try of it, so a try whose answer was lost can be sent again.
 */
export function idempotencyKey(req: Request): string | undefined {
  const key = req.get('idempotency-key');
  if (key === undefined) return undefined;
  if (!IDEMPOTENCY_KEY.test(key)) {
    throw AppError.badRequest('bad_idempotency_key', 'The Idempotency-Key header must be 8 to 128 letters, digits, dots, dashes, underscores or colons.', {
      fields: [{ field: 'Idempotency-Key', message: 'must be 8 to 128 of A–Z, a–z, 0–9, . _ : -' }],
    });
  }
  return key;
}

/**
 * How long a receipt is kept. A phone keeps a reading in its outbox until it is sent, however long it is out
 * of signal, and sends it again under the same key; 90 days covers any field trip, while the table no longer
 * grows for ever.
 */
export const RECEIPTS_KEPT_DAYS = 90;
/** Receipts older than the kept days are forgotten at most this often, by whichever create comes next. */
const FORGET_EVERY_MS = 60 * 60 * 1000;
let lastForgotAt = 0;

/** Forgets every receipt made before `cutoff`; returns how many. A repeat of one of those makes a new record. */
export async function forgetReceiptsBefore(cutoff: Date): Promise<number> {
  return RequestReceipt.destroy({ where: { createdAt: { [Op.lt]: cutoff } } });
}

/**
 * Once an hour at most, forget the receipts past their kept days. Trouble here never fails the create that
 * asked: it is written to the log as a warning (so a table that keeps growing has a cause to find) and tried
 * again by the next create.
 */
export async function forgetOldReceipts(now = Date.now(), logger?: Pick<Logger, 'warn'>): Promise<void> {
  if (now - lastForgotAt < FORGET_EVERY_MS) return;
  lastForgotAt = now;
  try {
    await forgetReceiptsBefore(new Date(now - RECEIPTS_KEPT_DAYS * 24 * 60 * 60 * 1000));
  } catch (err) {
    lastForgotAt = 0;
    logger?.warn({ err }, `Forgetting request receipts older than ${RECEIPTS_KEPT_DAYS} days failed; the next create tries again.`);
  }
}

/** Written by the create itself, inside its own transaction, once it knows the id of what it made. */
export type WriteReceipt = (transaction: Transaction, resourceId: number) => Promise<void>;

/** The body with its object keys in one order, so the same values sent in another order are the same request. */
function canonical(v: unknown): unknown {
  if (Array.isArray(v)) return v.map(canonical);
  if (v && typeof v === 'object') {
    return Object.fromEntries(
      Object.keys(v)
        .sort()
        .map((k) => [k, canonical((v as Record<string, unknown>)[k])]),
    );
  }
  return v;
}

export interface OnceOptions<T> {
  userId: number;
  /** The status of a first answer (201 for a new record, 200 for a change such as a close-out). */
  status: number;
  /** Makes the record; with a key, it calls `receipt` inside its transaction with the new record's id. */
  make: (receipt: WriteReceipt | undefined) => Promise<T>;
  /** The answer for a record made earlier under the same key: the record as it is now. */
  replay: (resourceId: number) => Promise<T>;
  /** Where trouble in the hourly forgetting of old receipts is written. */
  logger?: Pick<Logger, 'warn'>;
}

/**
 * A create that is safe to send twice. Without an Idempotency-Key it simply
 * runs. With one, the record and a receipt naming it are stored in one
 * transaction (unique per user and key); a later request under the same key
 * and the same body is answered with the first answer's status and that
 * record, with `Idempotent-Replayed: true`, and makes nothing. Two copies
 * sent together end the same way: the second meets the first's record or
 * receipt (the unique index holds it until the first commits), is rolled
 * back, and is answered from the receipt. The same key with another body or
 * address is refused (422 idempotency_key_reused) and changes nothing.
 */
export async function once<T>(req: Request, res: Response, opts: OnceOptions<T>): Promise<T> {
  const key = idempotencyKey(req);
  if (key === undefined) {
    const made = await opts.make(undefined);
    res.status(opts.status);
    return made;
  }
  const action = `${req.method} ${`${req.baseUrl}${req.path}`.replace(/\/+$/, '') || '/'}`.slice(0, 200);
  const bodySha256 = createHash('sha256')
    .update(JSON.stringify(canonical(req.body ?? null)) ?? 'null')
    .digest('hex');

  const answered = async (): Promise<{ value: T } | null> => {
    const receipt = await RequestReceipt.findOne({ where: { userId: opts.userId, idempotencyKey: key } });
    if (!receipt) return null;
    if (receipt.action !== action || receipt.bodySha256 !== bodySha256) {
      const what = receipt.action !== action ? `another request (${receipt.action})` : 'the same request with other values';
      throw new AppError(
        422,
        'idempotency_key_reused',
        `This Idempotency-Key was already used for ${what}: a repeat must send the same values. Nothing was changed; send a new key for a new request.`,
        { fields: [{ field: 'Idempotency-Key', message: receipt.action !== action ? 'already used for another request' : 'already used with other values' }] },
      );
    }
    res.status(receipt.statusCode);
    res.setHeader('idempotent-replayed', 'true');
    return { value: await opts.replay(receipt.resourceId) };
  };

  const earlier = await answered();
  if (earlier) return earlier.value;
  try {
    const made = await opts.make(async (transaction, resourceId) => {
      await RequestReceipt.create(
        { userId: opts.userId, idempotencyKey: key, action, bodySha256, statusCode: opts.status, resourceId },
        { transaction },
      );
    });
    res.status(opts.status);
    await forgetOldReceipts(Date.now(), opts.logger);
    return made;
  } catch (err) {
    // A copy of this request sent alongside it may have made the record first: then this one was refused
    // (already decided, already closed out, or the receipt's own unique index) and is answered as that copy was.
    const meanwhile = await answered();
    if (meanwhile) return meanwhile.value;
    throw err;
  }
}
