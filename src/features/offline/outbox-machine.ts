/**
 * The outbox on the phone: what was measured or decided without signal,
 * waiting to be sent. This module is the state machine only — plain data in,
 * plain data out, no storage and no network — so every step can be tested.
 *
 *   queued ──send──▶ sending ──answer──▶ sent
 *                        │                 ▲
 *                        ├─ no network, 5xx ──▶ failed (tried again later, or on "Try again")
 *                        ├─ 401 ──▶ sign-in (waits; sent after the owner signs in)
 *                        ├─ 403 ──▶ refused (kept on the phone; an administrator can save it)
 *                        └─ other 4xx ──▶ failed (not tried again by itself)
 *
 * An upload carries its idempotency key from the moment it is queued, so a
 * send that was cut off after the server stored the file, or that the app was
 * killed in the middle of, is sent again under the same key and answered with
 * the first result: never a second trace. A decision's key is made from its
 * own id (`decisionKey`), so every try of it sends the same one and the
 * server answers a repeat with the finding the first try made.
 */
import type { CableEnd, TraceStatus } from '../../../shared/schemas/traces';
import type { DeviceAnalysis } from '../../../shared/schemas/device-analysis';
import type { FindingStatus } from '../../../shared/schemas/findings';
import type { ReflectionType, TraceAnalysis } from '../../../shared/schemas/trace-analysis';

export const OUTBOX_STATES = ['queued', 'sending', 'sent', 'failed', 'sign-in', 'refused'] as const;
export type OutboxState = (typeof OUTBOX_STATES)[number];

export interface Problem {
  /** The server's error code, or `network` when no answer came. */
  code: string;
  message: string;
  /** HTTP status; 0 when the server could not be reached. */
  status: number;
  /** Whether the outbox tries again by itself (no network, a server fault); otherwise only on "Try again". */
  retryable: boolean;
}

interface ItemBase {
  id: string;
  /** The account that made it: only that account's session sends it. */
  userId: number;
  userName: string;
  createdAt: string;
  state: OutboxState;
  attempts: number;
  lastAttemptAt: string | null;
  /** When a failed item is due to be tried again by itself. */
  nextAttemptAt: string | null;
  problem: Problem | null;
  sentAt: string | null;
}

export interface DeviceEvent {
  index: number;
  type: ReflectionType;
  distanceM: number;
  windowStartM: number;
  windowEndM: number;
}

/** Where a trace was taken, as the technician chose it (names kept for showing it offline). */
export interface Where {
  siteId: number;
  siteName: string;
  cableRunId: number;
  cableRunName: string;
  end: CableEnd;
  endLabel: string;
}

export interface UploadItem extends ItemBase {
  kind: 'upload';
  /** Sent as the Idempotency-Key header on every try. */
  key: string;
  fileName: string;
  /** The raw file, unchanged; dropped once the server has it. */
  bytes: ArrayBuffer | null;
  sizeBytes: number;
  /** The upload form's fields as text, exactly as they are sent. */
  fields: Record<string, string>;
  where: Where;
  /** What the phone made of the file (null when the engine could not read it there). */
  analysis: TraceAnalysis | null;
  deviceError: string | null;
  summary: DeviceAnalysis | null;
  /** Samples the phone read and the time its engine took, to show beside the result. */
  sampleCount?: number;
  analysedMs?: number;
  result: {
    traceId: number;
    /** The server already had these bytes (a retry, or the same file uploaded earlier): nothing new was stored. */
    alreadyThere: boolean;
    traceStatus: TraceStatus;
    /** The server's events, to place decisions made on the phone; null until read. */
    events: DeviceEvent[] | null;
  } | null;
}

export interface DecisionItem extends ItemBase {
  kind: 'decision';
  /** The upload whose event was decided on the phone. */
  uploadId: string;
  event: DeviceEvent;
  status: FindingStatus;
  findingKind: string;
  note: string | null;
  /** The server's trace and event it was matched to, once the upload is in. */
  target: { traceId: number; eventIndex: number } | null;
  result: { findingId: number; alreadyDecided: boolean } | null;
}

export type OutboxItem = UploadItem | DecisionItem;

/** The Idempotency-Key a decision is sent under: the same on every try, as it is made from the item's own id. */
export const decisionKey = (item: DecisionItem) => `decision-${item.id}`;

/** What came back from one try: an HTTP answer, or none at all. */
export type Answer = { kind: 'network'; message: string } | { kind: 'http'; status: number; body: unknown };

const FIRST_RETRY_MS = 5_000;
const MAX_RETRY_MS = 5 * 60_000;

/** Wait before the outbox tries a failed item again by itself: 5 s, doubling, at most 5 min (common practice for back-off). */
export function retryDelayMs(attempts: number): number {
  return Math.min(MAX_RETRY_MS, FIRST_RETRY_MS * 2 ** Math.max(0, attempts - 1));
}

const iso = (d: Date) => d.toISOString();

/** Waiting, in some way, for the server: everything but sent. */
export const isUnsent = (item: OutboxItem) => item.state !== 'sent';

/** Whether a sync should try this item now. A manual sync ignores the back-off. */
export function isDue(item: OutboxItem, now: Date, manual = false): boolean {
  if (item.kind === 'decision' && !item.target) return false;
  if (item.state === 'queued') return true;
  if (item.state !== 'failed' || !item.problem?.retryable) return false;
  return manual || !item.nextAttemptAt || new Date(item.nextAttemptAt) <= now;
}

export function startSending<T extends OutboxItem>(item: T, now: Date): T {
  if (item.state === 'sent' || item.state === 'sending')
    throw new Error(`Item ${item.id} is ${item.state}; it cannot be sent now.`);
  return { ...item, state: 'sending', attempts: item.attempts + 1, lastAttemptAt: iso(now), nextAttemptAt: null };
}

function errorOf(body: unknown): { code: string; message: string; extra: Record<string, unknown> } {
  const e = (body as { error?: Record<string, unknown> } | null)?.error;
  return {
    code: typeof e?.code === 'string' ? e.code : '',
    message: typeof e?.message === 'string' ? e.message : '',
    extra: e ?? {},
  };
}

/** The outcome every kind of item shares: sign-in, refusal, no network, a server fault, a bad request. */
function unsent<T extends OutboxItem>(item: T, answer: Answer, now: Date): T {
  if (answer.kind === 'network') {
    return {
      ...item,
      state: 'failed',
      problem: { code: 'network', message: answer.message, status: 0, retryable: true },
      nextAttemptAt: iso(new Date(now.getTime() + retryDelayMs(item.attempts))),
    };
  }
  const { code, message } = errorOf(answer.body);
  const status = answer.status;
  if (status === 401) {
    return {
      ...item,
      state: 'sign-in',
      problem: {
        code: code || 'unauthenticated',
        message: 'Sign in again to send it: the sign-in on this phone has ended.',
        status,
        retryable: false,
      },
    };
  }
  if (status === 403) {
    return {
      ...item,
      state: 'refused',
      problem: {
        code: code || 'forbidden',
        message: message || 'The server refused it for this account.',
        status,
        retryable: false,
      },
    };
  }
  const retryable = status >= 500 || status === 408 || status === 429;
  return {
    ...item,
    state: 'failed',
    problem: { code: code || `http_${status}`, message: message || `The server answered ${status}.`, status, retryable },
    nextAttemptAt: retryable ? iso(new Date(now.getTime() + retryDelayMs(item.attempts))) : null,
  };
}

export interface TraceAnswer {
  id: number;
  status: TraceStatus;
  analysis: { events: DeviceEvent[] } | null;
}

const eventsOf = (t: TraceAnswer): DeviceEvent[] =>
  (t.analysis?.events ?? []).map((e) => ({
    index: e.index,
    type: e.type,
    distanceM: e.distanceM,
    windowStartM: e.windowStartM,
    windowEndM: e.windowEndM,
  }));

/**
 * An upload the server had already (events not in its answer) learns the server's events from the trace itself.
 * A large file still being analysed there ('pending') has none yet: they stay unknown and are read again later.
 */
export function withServerEvents(item: UploadItem, trace: TraceAnswer): UploadItem {
  if (!item.result) return item;
  return {
    ...item,
    result: { ...item.result, traceStatus: trace.status, events: trace.status === 'pending' ? null : eventsOf(trace) },
  };
}

function sentUpload(item: UploadItem, now: Date, result: UploadItem['result']): UploadItem {
  return { ...item, state: 'sent', problem: null, sentAt: iso(now), nextAttemptAt: null, bytes: null, result };
}

/** The server's answer to an upload, applied. */
export function settleUpload(item: UploadItem, answer: Answer, now: Date): UploadItem {
  if (item.state !== 'sending') throw new Error(`Upload ${item.id} is ${item.state}, not sending.`);
  if (answer.kind === 'http') {
    const body = answer.body as { traces?: TraceAnswer[]; replayed?: boolean } | null;
    // 201, or 202 for a large file stored and analysed in the background ('pending'): delivered either way.
    if (answer.status >= 200 && answer.status < 300 && body?.traces?.length) {
      const t = body.traces[0];
      return sentUpload(item, now, {
        traceId: t.id,
        alreadyThere: body.replayed === true,
        traceStatus: t.status,
        events: t.status === 'pending' ? null : eventsOf(t),
      });
    }
    const { code, extra } = errorOf(answer.body);
    // Already on the server: the same bytes were uploaded for this run and end (possibly by this very upload).
    const duplicates = extra.duplicates as Array<{ traceId: number }> | undefined;
    if (answer.status === 409 && code === 'duplicate_upload' && duplicates?.length) {
      return sentUpload(item, now, { traceId: duplicates[0].traceId, alreadyThere: true, traceStatus: 'ok', events: null });
    }
    // Stored, but the server's engine could not read it: the file is kept there, marked failed.
    const traces = extra.traces as TraceAnswer[] | undefined;
    if (answer.status === 422 && code === 'trace_unreadable' && traces?.length) {
      return sentUpload(item, now, {
        traceId: traces[0].id,
        alreadyThere: extra.replayed === true,
        traceStatus: 'failed',
        events: [],
      });
    }
  }
  return unsent(item, answer, now);
}

/** The server's answer to a decision, applied. */
export function settleDecision(item: DecisionItem, answer: Answer, now: Date): DecisionItem {
  if (item.state !== 'sending') throw new Error(`Decision ${item.id} is ${item.state}, not sending.`);
  if (answer.kind === 'http') {
    const body = answer.body as { id?: number } | null;
    if (answer.status >= 200 && answer.status < 300 && typeof body?.id === 'number') {
      return { ...item, state: 'sent', problem: null, sentAt: iso(now), result: { findingId: body.id, alreadyDecided: false } };
    }
    const { code, extra } = errorOf(answer.body);
    // Decided already — by this decision's earlier try whose answer was lost, or by someone else.
    if (answer.status === 409 && code === 'already_decided' && typeof extra.findingId === 'number') {
      return {
        ...item,
        state: 'sent',
        problem: null,
        sentAt: iso(now),
        result: { findingId: extra.findingId, alreadyDecided: true },
      };
    }
  }
  return unsent(item, answer, now);
}

/** "Try again": back in the queue, now. */
export function retry<T extends OutboxItem>(item: T): T {
  if (item.state === 'sent' || item.state === 'sending' || item.state === 'queued') return item;
  return { ...item, state: 'queued', nextAttemptAt: null };
}

/** After the owner signs in again, what waited for it goes back in the queue. */
export function resumeAfterSignIn<T extends OutboxItem>(item: T, userId: number): T {
  return item.userId === userId && item.state === 'sign-in' ? { ...item, state: 'queued', problem: null } : item;
}

/**
 * At start: an item left "sending" means the app was closed or killed during
 * the send. Whether or not the server got it, sending it again is safe: under
 * the same key the server answers with what the first try made.
 */
export function recoverInterrupted<T extends OutboxItem>(item: T): T {
  return item.state === 'sending' ? { ...item, state: 'queued' } : item;
}

/** When one item hits an ended sign-in, every item of the same owner still waiting waits for sign-in too. */
export function holdForSignIn<T extends OutboxItem>(item: T, userId: number): T {
  if (item.userId !== userId || item.state === 'sent' || item.state === 'refused') return item;
  return {
    ...item,
    state: 'sign-in',
    problem: {
      code: 'unauthenticated',
      message: 'Sign in again to send it: the sign-in on this phone has ended.',
      status: 401,
      retryable: false,
    },
  };
}

/**
 * The server's event a decision made on the phone is about: of the same type,
 * the nearest within the phone's window (or 0.5 m, if that is wider). None
 * when the server's analysis moved it out of reach — then the technician
 * decides again on the trace page rather than Rholog guessing.
 */
export function matchServerEvent(event: DeviceEvent, serverEvents: DeviceEvent[]): DeviceEvent | null {
  const reach = Math.max(0.5, (event.windowEndM - event.windowStartM) / 2);
  let best: DeviceEvent | null = null;
  for (const s of serverEvents) {
    if (s.type !== event.type) continue;
    const off = Math.abs(s.distanceM - event.distanceM);
    if (off <= reach && (!best || off < Math.abs(best.distanceM - event.distanceM))) best = s;
  }
  return best;
}

/** Once its upload is in, a decision learns which server trace and event it is about — or why it cannot be sent. */
export function bindDecision(item: DecisionItem, upload: UploadItem): DecisionItem {
  if (item.target || item.state === 'sent' || upload.state !== 'sent' || !upload.result?.events) return item;
  const { traceId, traceStatus, events } = upload.result;
  if (traceStatus !== 'ok') {
    return {
      ...item,
      state: 'failed',
      problem: {
        code: 'trace_failed',
        message: `The server could not read trace ${traceId}, so no finding can be made from it.`,
        status: 0,
        retryable: false,
      },
    };
  }
  const match = matchServerEvent(item.event, events);
  if (!match) {
    return {
      ...item,
      state: 'failed',
      problem: {
        code: 'event_moved',
        message: `The server's analysis of trace ${traceId} has no matching event (the cable library may have changed). Decide it on the trace page.`,
        status: 0,
        retryable: false,
      },
    };
  }
  return { ...item, target: { traceId, eventIndex: match.index } };
}
