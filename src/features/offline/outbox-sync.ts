/**
 * One pass over the outbox: send what is due, oldest first, for the signed-in
 * owner only, and write every step back to the store before the next, so
 * closing the app at any moment loses nothing. The network is a parameter
 * (`Transport`), which keeps this testable without a browser.
 */
import type { OutboxStore } from './device-db';
import {
  bindDecision,
  holdForSignIn,
  isDue,
  recoverInterrupted,
  settleDecision,
  settleUpload,
  startSending,
  withServerEvents,
  type Answer,
  type DecisionItem,
  type OutboxItem,
  type Problem,
  type TraceAnswer,
  type UploadItem,
} from './outbox-machine';

export interface Transport {
  upload: (item: UploadItem) => Promise<Answer>;
  decide: (item: DecisionItem) => Promise<Answer>;
  /** The server's trace, to learn its events. */
  trace: (traceId: number) => Promise<Answer>;
}

export interface SyncReport {
  /** Items the server took in this pass. */
  sent: number;
  /** Why the pass stopped short or left an item behind; null when nothing went wrong. */
  problem: Problem | null;
}

/** At start: items a closed or killed app left half-sent go back in the queue. */
export async function recoverOutbox(store: OutboxStore): Promise<number> {
  let n = 0;
  for (const item of await store.list()) {
    const next = recoverInterrupted(item);
    if (next !== item) {
      await store.put(next);
      n++;
    }
  }
  return n;
}

async function holdAll(store: OutboxStore, userId: number) {
  for (const item of await store.list()) {
    const next = holdForSignIn(item, userId);
    if (next !== item) await store.put(next);
  }
}

function problemOf(answer: Answer, fallback: string): Problem {
  if (answer.kind === 'network') return { code: 'network', message: answer.message, status: 0, retryable: true };
  const e = (answer.body as { error?: { code?: string; message?: string } } | null)?.error;
  return {
    code: e?.code ?? `http_${answer.status}`,
    message: e?.message ?? fallback,
    status: answer.status,
    retryable: answer.status >= 500,
  };
}

/**
 * Before a decision can go, its upload must be in and the server's event it
 * is about known. Returns the decision (bound, failed, or unchanged) or a
 * problem that stops the pass.
 */
async function prepareDecision(store: OutboxStore, transport: Transport, item: DecisionItem): Promise<DecisionItem | Problem> {
  if (item.target || item.state === 'sent') return item;
  let upload = await store.get(item.uploadId);
  if (!upload || upload.kind !== 'upload') {
    const failed: DecisionItem = {
      ...item,
      state: 'failed',
      problem: {
        code: 'upload_removed',
        message: 'The trace this decision was about was removed from the phone before it was sent.',
        status: 0,
        retryable: false,
      },
    };
    await store.put(failed);
    return failed;
  }
  if (upload.state !== 'sent' || !upload.result) return item;
  if (!upload.result.events) {
    const answer = await transport.trace(upload.result.traceId);
    if (answer.kind !== 'http' || answer.status !== 200)
      return problemOf(answer, 'The trace could not be read back from the server.');
    upload = withServerEvents(upload, answer.body as TraceAnswer);
    await store.put(upload);
  }
  const bound = bindDecision(item, upload);
  if (bound !== item) await store.put(bound);
  return bound;
}

export async function syncOutbox(
  store: OutboxStore,
  transport: Transport,
  userId: number,
  opts: { manual?: boolean; now?: () => Date } = {},
): Promise<SyncReport> {
  const now = opts.now ?? (() => new Date());
  let sent = 0;
  let problem: Problem | null = null;
  for (const listed of await store.list()) {
    let item: OutboxItem | undefined = await store.get(listed.id);
    if (!item || item.userId !== userId) continue;
    if (item.kind === 'decision') {
      const prepared = await prepareDecision(store, transport, item);
      if ('code' in prepared) {
        problem = prepared;
        if (prepared.status === 401) await holdAll(store, userId);
        break;
      }
      // Reported once, in the pass that found the decision could not be placed.
      if (prepared !== item && prepared.state === 'failed') problem ??= prepared.problem;
      item = prepared;
    }
    if (!isDue(item, now(), opts.manual)) continue;
    const sending = startSending(item, now());
    await store.put(sending);
    const settled: OutboxItem =
      sending.kind === 'upload'
        ? settleUpload(sending, await transport.upload(sending), now())
        : settleDecision(sending, await transport.decide(sending), now());
    await store.put(settled);
    if (settled.state === 'sent') {
      sent++;
      continue;
    }
    problem = settled.problem;
    if (settled.state === 'sign-in') {
      await holdAll(store, userId);
      break;
    }
    // Refused, or no network / a server fault: the rest would meet the same.
    if (settled.state === 'refused' || settled.problem?.retryable) break;
  }
  return { sent, problem };
}
